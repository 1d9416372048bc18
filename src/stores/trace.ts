import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import { computeCalibration } from '@shared/calibration/geometry';
import type { CalibrationFrame, CalibrationInput } from '@shared/schemas/calibration';
import { fetchClip, frameUrl, saveCalibration, deleteCalibration, type Clip } from '@/api/clips';
import {
  createFlight,
  deleteFlight,
  fetchFlight,
  fetchPoints,
  importTrackCsv,
  listClipFlights,
  listFlightActions,
  savePoints,
  startFit,
  startFollow,
  updateFlight,
  type Flight,
  type FlightAction,
  type FlightInput,
  type FlightPatch,
  type TrackPoint,
  type TrackPointInput,
} from '@/api/flights';
import { watchJob, type Job } from '@/api/jobs';
import { loadErrorText } from '@/composables/use-loader';
import type { CanvasMode, HandleKey } from '@/components/trace/canvas-types';
import { createHistory } from '@/components/trace/history';
import {
  deletePoint,
  placePoint,
  pointAt,
  sameTrack,
  stepFrame,
  type TracePoint,
} from '@/components/trace/track-edit';
import type { Vec2 } from '@/components/trace/viewport';
import { useClubStore } from './club';

/** The calibration being edited on the Trace screen, in image pixels; saved to the clip with `saveCalibration`. */
export interface CalibrationDraft {
  scale: { a: Vec2; b: Vec2 } | null;
  distanceM: number | null;
  level: { a: Vec2; b: Vec2 } | null;
  origin: Vec2 | null;
  direction: 'right' | 'left';
  ballId: string | null;
}

const EMPTY_DRAFT: CalibrationDraft = { scale: null, distanceM: null, level: null, origin: null, direction: 'right', ballId: null };

export function fromTrackPoint(p: TrackPoint): TracePoint {
  return { frame: p.frame, x: p.xPx, y: p.yPx, radius: p.radiusPx ?? null, source: p.source, confidence: p.confidence ?? null };
}

export function toTrackPointInput(p: TracePoint): TrackPointInput {
  return { frame: p.frame, xPx: p.x, yPx: p.y, radiusPx: p.radius, source: p.source, confidence: p.confidence };
}

const vec = (p: { xPx: number; yPx: number }): Vec2 => ({ x: p.xPx, y: p.yPx });
const px = (p: Vec2) => ({ xPx: p.x, yPx: p.y });

function draftFromClip(clip: Clip | null): CalibrationDraft {
  const c = clip?.calibration;
  if (!c) return { ...EMPTY_DRAFT };
  return {
    scale: { a: vec(c.scale.a), b: vec(c.scale.b) },
    distanceM: c.scale.distanceM,
    level: c.level ? { a: vec(c.level.a), b: vec(c.level.b) } : null,
    origin: vec(c.origin),
    direction: c.direction,
    ballId: c.ball?.ballId ?? null,
  };
}

/**
 * State of the Trace screen: the clip, its flights, the track being edited with its undo history, the frame in
 * view, auto-follow and fit jobs, and the calibration draft. Edits stay local until `save()`.
 */
export const useTraceStore = defineStore('trace', () => {
  const club = useClubStore();

  const clip = shallowRef<Clip | null>(null);
  const flights = shallowRef<Flight[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const flightId = ref<number | null>(null);
  const points = shallowRef<TracePoint[]>([]);
  const saved = shallowRef<TracePoint[]>([]);
  const frame = ref(0);
  const mode = ref<CanvasMode>('mark');
  const loading = ref(false);
  const loadError = ref<string | null>(null);
  const pointsLoading = ref(false);
  const saving = ref(false);
  const followJob = shallowRef<Job | null>(null);
  const followError = ref<string | null>(null);
  const fitJob = shallowRef<Job | null>(null);
  const fitError = ref<string | null>(null);
  const draft = ref<CalibrationDraft>({ ...EMPTY_DRAFT });
  const calibrationSaving = ref(false);
  /** Where the pointer is over the frame (image px), for the coordinate readout. */
  const hover = ref<Vec2 | null>(null);

  const history = createHistory<TracePoint[]>();
  // The history object is not reactive; this counter makes canUndo/canRedo recompute after each change.
  const historyVersion = ref(0);
  let jobsStop = new AbortController();

  const clubId = computed(() => club.clubId);
  const readOnly = computed(() => !club.hasRole(['admin', 'coach']));
  const frameCount = computed(() => clip.value?.frameCount ?? 0);
  const flight = computed(() => flights.value.find((f) => f.id === flightId.value) ?? null);
  const dirty = computed(() => !sameTrack(points.value, saved.value));
  const currentPoint = computed(() => pointAt(points.value, frame.value));
  const canUndo = computed(() => historyVersion.value >= 0 && history.canUndo());
  const canRedo = computed(() => historyVersion.value >= 0 && history.canRedo());
  const timeS = computed(() => (clip.value ? frame.value / clip.value.captureFps : 0));
  const following = computed(() => followJob.value !== null && (followJob.value.status === 'queued' || followJob.value.status === 'running'));
  const fitting = computed(() => fitJob.value !== null && (fitJob.value.status === 'queued' || fitJob.value.status === 'running'));

  /** The saved calibration's pixel → metre frame (null until the clip is calibrated). */
  const savedFrame = computed<CalibrationFrame | null>(() => {
    const c = clip.value?.calibration;
    return c ? computeCalibration(c) : null;
  });

  /** The draft as an API body, or null while a required part is missing. */
  const draftInput = computed<CalibrationInput | null>(() => {
    const d = draft.value;
    // A zero or negative distance still makes a body, so the shared schema's message about it shows.
    if (!d.scale || !d.origin || d.distanceM === null) return null;
    return {
      scale: { a: px(d.scale.a), b: px(d.scale.b), distanceM: d.distanceM },
      level: d.level ? { a: px(d.level.a), b: px(d.level.b) } : null,
      origin: px(d.origin),
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

  function bump(): void {
    historyVersion.value += 1;
  }

  function resetTrack(list: TracePoint[]): void {
    points.value = list;
    saved.value = list;
    history.clear();
    bump();
  }

  async function open(clipId: number, wantedFlightId: number | null): Promise<void> {
    const id = clubId.value;
    if (id === null) return;
    stopJobs();
    loading.value = true;
    loadError.value = null;
    try {
      const [c, list, acts] = await Promise.all([fetchClip(id, clipId), listClipFlights(id, clipId), listFlightActions(id)]);
      clip.value = c;
      flights.value = list.data;
      actions.value = acts;
      draft.value = draftFromClip(c);
      followJob.value = null;
      fitJob.value = null;
      followError.value = null;
      fitError.value = null;
      const chosen = list.data.find((f) => f.id === wantedFlightId) ?? list.data[0] ?? null;
      await selectFlight(chosen?.id ?? null);
      if (!chosen) frame.value = 0;
    } catch (cause) {
      loadError.value = loadErrorText(cause);
    } finally {
      loading.value = false;
    }
  }

  /** Shows another flight of the clip (the caller asks first when there are unsaved edits). */
  async function selectFlight(id: number | null): Promise<void> {
    flightId.value = id;
    followError.value = null;
    fitError.value = null;
    if (id === null || clubId.value === null) {
      resetTrack([]);
      return;
    }
    pointsLoading.value = true;
    try {
      const list = await fetchPoints(clubId.value, id);
      if (flightId.value !== id) return;
      resetTrack(list.map(fromTrackPoint));
      const f = flight.value;
      // Land on the first marked frame, or the flight's first frame.
      frame.value = list[0]?.frame ?? f?.frameStart ?? 0;
    } finally {
      pointsLoading.value = false;
    }
  }

  function setFrame(n: number): void {
    frame.value = stepFrame(n, 0, frameCount.value);
  }

  function step(delta: number): void {
    frame.value = stepFrame(frame.value, delta, frameCount.value);
  }

  function frameSrc(n: number): string | null {
    if (!clip.value || clubId.value === null || !clip.value.framesReady) return null;
    return frameUrl(clubId.value, clip.value.id, n);
  }

  /** Why a point cannot be placed on the frame in view, or null when it can. */
  function placeProblem(): string | null {
    const f = flight.value;
    if (readOnly.value) return 'Your role can look at tracks but not change them.';
    if (!f) return 'Add a flight first: a mark belongs to one flight (athlete, action and ball).';
    if (frame.value < f.frameStart || frame.value > f.frameEnd) {
      return `Frame ${frame.value} is outside this flight's frames (${f.frameStart}–${f.frameEnd}). Widen the flight's frame range first.`;
    }
    return null;
  }

  function edit(label: string, change: (list: TracePoint[]) => TracePoint[]): void {
    const before = points.value;
    const after = change(before);
    if (after === before) return;
    history.record(before, label);
    points.value = after;
    bump();
  }

  function place(p: { x: number; y: number; radius: number | null }): void {
    if (placeProblem()) return;
    edit(`mark frame ${frame.value}`, (list) => placePoint(list, frame.value, p.x, p.y, p.radius ?? undefined));
  }

  function deleteAt(n: number = frame.value): boolean {
    if (readOnly.value || !pointAt(points.value, n)) return false;
    edit(`remove frame ${n}`, (list) => deletePoint(list, n));
    return true;
  }

  function clearAll(): void {
    if (readOnly.value || points.value.length === 0) return;
    edit('clear the track', () => []);
  }

  function undo(): void {
    const back = history.undo(points.value);
    if (back) {
      points.value = back;
      bump();
    }
  }

  function redo(): void {
    const forward = history.redo(points.value);
    if (forward) {
      points.value = forward;
      bump();
    }
  }

  /** Puts a flight's new state into the list (status, point count, latest fit). */
  async function refreshFlight(id: number): Promise<void> {
    if (clubId.value === null) return;
    const detail = await fetchFlight(clubId.value, id);
    // FlightDetail carries points and a clip summary too; the list keeps the flight fields only.
    const { points: _points, clip: _clip, ...rest } = detail;
    flights.value = flights.value.map((f) => (f.id === id ? rest : f));
  }

  async function save(): Promise<boolean> {
    const f = flight.value;
    if (!f || clubId.value === null || readOnly.value) return false;
    saving.value = true;
    try {
      const answer = await savePoints(clubId.value, f.id, points.value.map(toTrackPointInput));
      const list = answer.map(fromTrackPoint);
      // Keep the undo history: the coach may still take back an edit after saving (and save again).
      points.value = list;
      saved.value = list;
      await refreshFlight(f.id);
      return true;
    } finally {
      saving.value = false;
    }
  }

  /**
   * Follows the ball from the mark on the frame in view. Unsaved marks are saved first, because the follower
   * starts from the stored track and keeps the points before the start frame.
   */
  async function follow(): Promise<void> {
    const f = flight.value;
    const start = currentPoint.value;
    if (!f || !start || clubId.value === null || readOnly.value) return;
    followError.value = null;
    if (dirty.value) await save();
    const job = await startFollow(clubId.value, f.id, { frame: start.frame, xPx: start.x, yPx: start.y, radiusPx: start.radius });
    followJob.value = job;
    const id = clubId.value;
    try {
      const last = await watchJob(id, job.id, (j) => (followJob.value = j), jobsStop.signal);
      if (last.status === 'failed') {
        followError.value = last.error ?? 'The follower stopped without a reason. Try again from another mark.';
        return;
      }
      if (flightId.value !== f.id) return;
      const list = (await fetchPoints(id, f.id)).map(fromTrackPoint);
      // Undo can take the follower's points back (then Save keeps that).
      history.record(points.value, 'auto-follow');
      points.value = list;
      saved.value = list;
      bump();
      await refreshFlight(f.id);
    } catch (cause) {
      if (cause instanceof DOMException && cause.name === 'AbortError') return;
      followError.value = loadErrorText(cause);
    }
  }

  async function fit(): Promise<void> {
    const f = flight.value;
    if (!f || clubId.value === null || readOnly.value) return;
    fitError.value = null;
    if (dirty.value) await save();
    const id = clubId.value;
    try {
      const job = await startFit(id, f.id);
      fitJob.value = job;
      const last = await watchJob(id, job.id, (j) => (fitJob.value = j), jobsStop.signal);
      if (last.status === 'failed') fitError.value = last.error ?? 'The fit stopped without a reason.';
      await refreshFlight(f.id);
    } catch (cause) {
      if (cause instanceof DOMException && cause.name === 'AbortError') return;
      fitError.value = loadErrorText(cause);
    }
  }

  /** Replaces the track by a CSV's points (the server checks every cell and names the first bad one). */
  async function importCsv(text: string): Promise<void> {
    const f = flight.value;
    if (!f || clubId.value === null || readOnly.value) return;
    const answer = await importTrackCsv(clubId.value, f.id, text, { notify: false });
    history.record(points.value, 'CSV import');
    const list = answer.map(fromTrackPoint);
    points.value = list;
    saved.value = list;
    bump();
    await refreshFlight(f.id);
  }

  async function addFlight(input: FlightInput): Promise<Flight | null> {
    const c = clip.value;
    if (!c || clubId.value === null) return null;
    const created = await createFlight(clubId.value, c.id, input, { notify: false });
    flights.value = [...flights.value, created];
    await selectFlight(created.id);
    return created;
  }

  async function changeFlight(id: number, patch: FlightPatch): Promise<Flight | null> {
    if (clubId.value === null) return null;
    const updated = await updateFlight(clubId.value, id, patch, { notify: false });
    flights.value = flights.value.map((f) => (f.id === id ? updated : f));
    return updated;
  }

  async function removeFlight(id: number): Promise<void> {
    if (clubId.value === null) return;
    await deleteFlight(clubId.value, id);
    flights.value = flights.value.filter((f) => f.id !== id);
    if (flightId.value === id) await selectFlight(flights.value[0]?.id ?? null);
  }

  // ---------- calibration ----------
  function setLine(which: 'scale' | 'level', line: { a: Vec2; b: Vec2 }): void {
    draft.value = { ...draft.value, [which]: line };
  }

  function setOrigin(p: Vec2): void {
    draft.value = { ...draft.value, origin: p };
  }

  function moveHandle(key: HandleKey, at: Vec2): void {
    const d = draft.value;
    if (key === 'origin') draft.value = { ...d, origin: at };
    else {
      const [which, end] = key.split('.') as ['scale' | 'level', 'a' | 'b'];
      const line = d[which];
      if (line) draft.value = { ...d, [which]: { ...line, [end]: at } };
    }
  }

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
      const answer = await saveCalibration(clubId.value, c.id, { ...input, ball }, { notify: false });
      const { refitJobIds, ...calibration } = answer;
      clip.value = { ...c, calibration };
      draft.value = draftFromClip(clip.value);
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

  function stopJobs(): void {
    jobsStop.abort();
    jobsStop = new AbortController();
  }

  /** Leaves the screen: stop watching jobs and forget the clip. */
  function close(): void {
    stopJobs();
    clip.value = null;
    flights.value = [];
    flightId.value = null;
    resetTrack([]);
    mode.value = 'mark';
    followJob.value = null;
    fitJob.value = null;
  }

  watch(
    () => club.clubId,
    () => close(),
  );

  return {
    clip,
    flights,
    actions,
    flightId,
    flight,
    points,
    saved,
    frame,
    mode,
    loading,
    loadError,
    pointsLoading,
    saving,
    followJob,
    followError,
    fitJob,
    fitError,
    following,
    fitting,
    draft,
    draftInput,
    draftFrame,
    savedFrame,
    calibrationSaving,
    hover,
    readOnly,
    frameCount,
    dirty,
    currentPoint,
    canUndo,
    canRedo,
    timeS,
    open,
    selectFlight,
    setFrame,
    step,
    frameSrc,
    placeProblem,
    place,
    deleteAt,
    clearAll,
    undo,
    redo,
    save,
    follow,
    fit,
    importCsv,
    addFlight,
    changeFlight,
    removeFlight,
    refreshFlight,
    setLine,
    setOrigin,
    moveHandle,
    resetDraft,
    saveDraft,
    removeCalibration,
    close,
  };
});
