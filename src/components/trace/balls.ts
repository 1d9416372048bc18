import { BALLS, type BallSpec } from '@shared/physics/balls';

/** Balls of the catalogue for pickers, in catalogue order. */
export const BALL_OPTIONS: { label: string; value: string }[] = Object.values(BALLS).map((b: BallSpec) => ({ label: b.name, value: b.id }));

/** A ball's name for the screen; an id the catalogue does not know (a club's own ball) is shown as is. */
export function ballName(id: string): string {
  return BALLS[id]?.name ?? id;
}

/** Nominal diameter (m) of a catalogue ball, for the size cross-check; null when unknown. */
export function ballDiameterM(id: string | null): number | null {
  if (!id) return null;
  return BALLS[id]?.diameterM.nominal ?? null;
}
