import { computed, ref, type Ref, type ShallowRef } from 'vue';
import { computeCalibration } from '@shared/calibration/geometry';
import type { CalibrationFrame, CalibrationInput, CalibrationMethod } from '@shared/schemas/calibration';
import { deleteCalibration, saveCalibration, type Clip } from '@/api/clips';
import type { HandleKey } from './canvas-types';
import type { Vec2 } from './viewport';

/** The calibration being edited on the Trace screen, in image pixels; saved to the clip with `saveDraft`. */
export interface CalibrationDraft {
  /** Two-point scale (camera square to the flight) or the plane's four corners (camera at an angle). */
  method: CalibrationMethod;
  scale: { a: Vec2; b: Vec2 } | null;
  distanceM: number | null;
  level: { a: Vec2; b: Vec2 } | null;
  origin: Vec2 | null;
  direction: 'right' | 'left';
  ballId: string | null;
  /** Height of the origin above the ground (m) when the ground is outside the picture; null or 0: on the ground. */
  groundOffsetM: number | null;
  /** Plane method: the rectangle's corners as clicked (bottom left, bottom right, top right, top left), and its size (m). */
  corners: Vec2[];
  planeWidthM: number | null;
  planeHeightM: number | null;
}

const EMPTY_DRAFT: CalibrationDraft = {
  method: 'scale',
  scale: null,
  distanceM: null,
  level: null,
  origin: null,
  direction: 'right',
  ballId: null,
  groundOffsetM: null,
  corners: [],
  planeWidthM: null,
  planeHeightM: null,
};

const vec = (p: { xPx: number; yPx: number }): Vec2 => ({ x: p.xPx, y: p.yPx });
const px = (p: Vec2) => ({ xPx: p.x, yPx: p.y });

function draftFromClip(clip: Clip | null): CalibrationDraft {
  const c = clip?.calibration;
  if (!c) return { ...EMPTY_DRAFT };
  const common = { origin: vec(c.origin), direction: c.direction, ballId: c.ball?.ballId ?? null, groundOffsetM: c.groundOffsetM ?? null };
  if (c.method === 'plane') {
    return { ...EMPTY_DRAFT, ...common, method: 'plane', corners: c.plane.corners.map(vec), planeWidthM: c.plane.widthM, planeHeightM: c.plane.heightM };
  }
  return {
    ...EMPTY_DRAFT,
    ...common,
    scale: { a: vec(c.scale.a), b: vec(c.scale.b) },
    distanceM: c.scale.distanceM,
    level: c.level ? { a: vec(c.level.a), b: vec(c.level.b) } : null,
  };
}

/**
 * The clip's calibration on the Trace screen: the saved one's pixel → metre frame, the draft being drawn (scale
 * line and level line, or the plane's four corners; origin, direction), its preview, and saving or removing it.
 */
export function useCalibrationDraft(clip: ShallowRef<Clip | null>, clubId: Ref<number | null>, frameInView: Ref<number>) {
  const draft = ref<CalibrationDraft>({ ...EMPTY_DRAFT });
  const calibrationSaving = ref(false);

  /** The saved calibration's pixel → metre frame (null until the clip is calibrated). */
  const savedFrame = computed<CalibrationFrame | null>(() => {
    const c = clip.value?.calibration;
    return c ? computeCalibration(c) : null;
  });

  /** The draft as an API body, or null while a required part is missing. */
  const draftInput = computed<CalibrationInput | null>(() => {
    const d = draft.value;
    // A zero or negative distance or size still makes a body, so the shared schema's message about it shows.
    if (d.method === 'plane') {
      if (d.corners.length !== 4 || !d.origin || d.planeWidthM === null || d.planeHeightM === null) return null;
      return {
        method: 'plane',
        plane: { corners: d.corners.map(px), widthM: d.planeWidthM, heightM: d.planeHeightM },
        origin: px(d.origin),
        groundOffsetM: d.groundOffsetM,
        direction: d.direction,
        ball: null,
      };
    }
    if (!d.scale || !d.origin || d.distanceM === null) return null;
    return {
      method: 'scale',
      scale: { a: px(d.scale.a), b: px(d.scale.b), distanceM: d.distanceM },
      level: d.level ? { a: px(d.level.a), b: px(d.level.b) } : null,
      origin: px(d.origin),
      groundOffsetM: d.groundOffsetM,
      direction: d.direction,
      ball: null,
    };
  });

  /** The draft's pixel → metre frame, previewed exactly as the server will compute it. */
  const draftFrame = computed<CalibrationFrame | null>(() => {
    const input = draftInput.value;
    if (!input) return null;
    try {
      return computeCalibration(input);
    } catch {
      return null;
    }
  });

  function setLine(which: 'scale' | 'level', line: { a: Vec2; b: Vec2 }): void {
    draft.value = { ...draft.value, [which]: line };
  }

  function setOrigin(p: Vec2): void {
    draft.value = { ...draft.value, origin: p };
  }

  /**
   * Moves a handle. A plane corner one past the last is a new corner: the coach clicks the four in turn.
   */
  function moveHandle(key: HandleKey, at: Vec2): void {
    const d = draft.value;
    if (key === 'origin') draft.value = { ...d, origin: at };
    else if (key.startsWith('plane.')) {
      const i = Number(key.slice('plane.'.length));
      if (i > d.corners.length) return;
      const corners = [...d.corners];
      corners[i] = at;
      draft.value = { ...d, corners };
    } else {
      const [which, end] = key.split('.') as ['scale' | 'level', 'a' | 'b'];
      const line = d[which];
      if (line) draft.value = { ...d, [which]: { ...line, [end]: at } };
    }
  }

  function setMethod(method: CalibrationMethod): void {
    draft.value = { ...draft.value, method };
  }

  function clearCorners(): void {
    draft.value = { ...draft.value, corners: [] };
  }

  /** Puts the draft back to the clip's saved calibration (or an empty draft). */
  function resetDraft(): void {
    draft.value = draftFromClip(clip.value);
  }

  /**
   * Saves the draft as the clip's calibration (the server re-fits the clip's traced flights).
   * @param ball the ball and its apparent diameter in pixels for the size cross-check, when known
   */
  async function saveDraft(ball: { ballId: string; diameterPx: number } | null): Promise<{ refits: number }> {
    const c = clip.value;
    const input = draftInput.value;
    if (!c || !input || clubId.value === null) return { refits: 0 };
    calibrationSaving.value = true;
    try {
      // The frame in view is the one marked on: with a moving camera the track is carried into its pixels.
      const answer = await saveCalibration(clubId.value, c.id, { ...input, ball, frame: frameInView.value }, { notify: false });
      const { refitJobIds, ...calibration } = answer;
      clip.value = { ...c, calibration };
      resetDraft();
      return { refits: refitJobIds.length };
    } finally {
      calibrationSaving.value = false;
    }
  }

  async function removeCalibration(): Promise<void> {
    const c = clip.value;
    if (!c || clubId.value === null) return;
    await deleteCalibration(clubId.value, c.id);
    clip.value = { ...c, calibration: null };
    draft.value = { ...EMPTY_DRAFT };
  }

  return { draft, draftInput, draftFrame, savedFrame, calibrationSaving, setLine, setOrigin, setMethod, clearCorners, moveHandle, resetDraft, saveDraft, removeCalibration };
}
