import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import { fetchClip, frameUrl, type Clip } from '@/api/clips';
import {
  createFlight,
  deleteFlight,
  fetchFlight,
  fetchPoints,
  importTrackCsv,
  listClipFlights,
  listFlightActions,
  savePoints,
  updateFlight,
  type Flight,
  type FlightAction,
  type FlightInput,
  type FlightPatch,
} from '@/api/flights';
import { loadErrorText } from '@/composables/use-loader';
import type { CanvasMode } from '@/components/trace/canvas-types';
import { deletePoint, placePoint, pointAt, stepFrame } from '@/components/trace/track-edit';
import { useCalibrationDraft } from '@/components/trace/use-calibration-draft';
import { useTraceJobs } from '@/components/trace/use-trace-jobs';
import { fromTrackPoint, toTrackPointInput, useTrackEditing } from '@/components/trace/use-track-editing';
import type { Vec2 } from '@/components/trace/viewport';
import { useClubStore } from './club';

/**
 * State of the Trace screen: the clip, its flights, the frame in view, and three parts of their own: the track
 * being edited with its undo history (`useTrackEditing`), the auto-follow and fit jobs (`useTraceJobs`) and the
 * calibration draft (`useCalibrationDraft`). Edits stay local until `save()`.
 */
export const useTraceStore = defineStore('trace', () => {
  const club = useClubStore();

  const clip = shallowRef<Clip | null>(null);
  const flights = shallowRef<Flight[]>([]);
  const actions = shallowRef<FlightAction[]>([]);
  const flightId = ref<number | null>(null);
  const frame = ref(0);
  const mode = ref<CanvasMode>('mark');
  const loading = ref(false);
  const loadError = ref<string | null>(null);
  const pointsLoading = ref(false);
  const saving = ref(false);
  /** Where the pointer is over the frame (image px), for the coordinate readout. */
  const hover = ref<Vec2 | null>(null);

  const clubId = computed(() => club.clubId);
  const readOnly = computed(() => !club.hasRole(['admin', 'coach']));
  const frameCount = computed(() => clip.value?.frameCount ?? 0);
  const flight = computed(() => flights.value.find((f) => f.id === flightId.value) ?? null);
  const timeS = computed(() => (clip.value ? frame.value / clip.value.captureFps : 0));

  const track = useTrackEditing();
  const { points } = track;
  const currentPoint = computed(() => pointAt(points.value, frame.value));
  const calibration = useCalibrationDraft(clip, clubId, frame);
  const jobs = useTraceJobs({
    clubId,
    flightId,
    flight,
    currentPoint,
    readOnly,
    dirty: track.dirty,
    save,
    adopt: track.adopt,
    refreshFlight,
  });

  async function open(clipId: number, wantedFlightId: number | null): Promise<void> {
    const id = clubId.value;
    if (id === null) return;
    jobs.stopJobs();
    loading.value = true;
    loadError.value = null;
    try {
      const [c, list, acts] = await Promise.all([fetchClip(id, clipId), listClipFlights(id, clipId), listFlightActions(id)]);
      clip.value = c;
      flights.value = list.data;
      actions.value = acts;
      calibration.resetDraft();
      jobs.clearJobs();
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
    jobs.clearErrors();
    if (id === null || clubId.value === null) {
      track.resetTrack([]);
      return;
    }
    pointsLoading.value = true;
    try {
      const list = await fetchPoints(clubId.value, id);
      if (flightId.value !== id) return;
      track.resetTrack(list.map(fromTrackPoint));
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

  function place(p: { x: number; y: number; radius: number | null }): void {
    if (placeProblem()) return;
    track.edit(`mark frame ${frame.value}`, (list) => placePoint(list, frame.value, p.x, p.y, p.radius ?? undefined));
  }

  function deleteAt(n: number = frame.value): boolean {
    if (readOnly.value || !pointAt(points.value, n)) return false;
    track.edit(`remove frame ${n}`, (list) => deletePoint(list, n));
    return true;
  }

  function clearAll(): void {
    if (readOnly.value || points.value.length === 0) return;
    track.edit('clear the track', () => []);
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
      track.markSaved(answer.map(fromTrackPoint));
      await refreshFlight(f.id);
      return true;
    } finally {
      saving.value = false;
    }
  }

  /** Replaces the track by a CSV's points (the server checks every cell and names the first bad one). */
  async function importCsv(text: string): Promise<void> {
    const f = flight.value;
    if (!f || clubId.value === null || readOnly.value) return;
    const answer = await importTrackCsv(clubId.value, f.id, text, { notify: false });
    track.adopt(answer.map(fromTrackPoint), 'CSV import');
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

  /** Leaves the screen: stop watching jobs and forget the clip. */
  function close(): void {
    jobs.stopJobs();
    clip.value = null;
    flights.value = [];
    flightId.value = null;
    track.resetTrack([]);
    mode.value = 'mark';
    jobs.clearJobs();
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
    saved: track.saved,
    frame,
    mode,
    loading,
    loadError,
    pointsLoading,
    saving,
    followJob: jobs.followJob,
    followError: jobs.followError,
    fitJob: jobs.fitJob,
    fitError: jobs.fitError,
    following: jobs.following,
    fitting: jobs.fitting,
    draft: calibration.draft,
    draftInput: calibration.draftInput,
    draftFrame: calibration.draftFrame,
    savedFrame: calibration.savedFrame,
    calibrationSaving: calibration.calibrationSaving,
    hover,
    readOnly,
    frameCount,
    dirty: track.dirty,
    currentPoint,
    canUndo: track.canUndo,
    canRedo: track.canRedo,
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
    undo: track.undo,
    redo: track.redo,
    save,
    follow: jobs.follow,
    fit: jobs.fit,
    importCsv,
    addFlight,
    changeFlight,
    removeFlight,
    refreshFlight,
    setLine: calibration.setLine,
    setOrigin: calibration.setOrigin,
    setMethod: calibration.setMethod,
    clearCorners: calibration.clearCorners,
    moveHandle: calibration.moveHandle,
    resetDraft: calibration.resetDraft,
    saveDraft: calibration.saveDraft,
    removeCalibration: calibration.removeCalibration,
    close,
  };
});
