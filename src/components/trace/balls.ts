import { shallowRef } from 'vue';
import { BALLS, type BallSpec } from '@shared/physics/balls';
import type { ClubBall } from '@shared/schemas/ball';

/** Balls of the catalogue for pickers, in catalogue order. */
export const BALL_OPTIONS: { label: string; value: string }[] = Object.values(BALLS).map((b: BallSpec) => ({ label: b.name, value: b.id }));

/** The club's own balls of the club in view, set by the balls store; reactive so names update when they load. */
const clubBalls = shallowRef<ReadonlyMap<string, ClubBall>>(new Map());

/** Called by the balls store whenever the club's list changes. */
export function setClubBalls(list: readonly ClubBall[]): void {
  clubBalls.value = new Map(list.map((b) => [b.ballId, b]));
}

/** Picker options grouped as the catalogue and the club's own balls (the group is left out while empty). */
export function groupedBallOptions(): { label: string; items: { label: string; value: string }[] }[] {
  const own = [...clubBalls.value.values()].map((b) => ({ label: b.name, value: b.ballId }));
  return [{ label: 'Catalogue', items: BALL_OPTIONS }, ...(own.length > 0 ? [{ label: 'Club balls', items: own }] : [])];
}

/** A ball's name for the screen: the catalogue's or the club's; an id neither knows is shown as is. */
export function ballName(id: string): string {
  return BALLS[id]?.name ?? clubBalls.value.get(id)?.name ?? id;
}

/** Nominal diameter (m) of a catalogue or club ball, for the size cross-check; null when unknown. */
export function ballDiameterM(id: string | null): number | null {
  if (!id) return null;
  return BALLS[id]?.diameterM.nominal ?? clubBalls.value.get(id)?.diameterM ?? null;
}
