import { computed, ref, shallowRef } from 'vue';
import type { TrackPoint, TrackPointInput } from '@/api/flights';
import { createHistory } from './history';
import { sameTrack, type TracePoint } from './track-edit';

export function fromTrackPoint(p: TrackPoint): TracePoint {
  return { frame: p.frame, x: p.xPx, y: p.yPx, radius: p.radiusPx ?? null, source: p.source, confidence: p.confidence ?? null };
}

export function toTrackPointInput(p: TracePoint): TrackPointInput {
  return { frame: p.frame, xPx: p.x, yPx: p.y, radiusPx: p.radius, source: p.source, confidence: p.confidence };
}

/**
 * The track being edited on the Trace screen: the points on screen, the points last saved, and the undo history.
 * Every change goes through `edit` (a local edit) or `adopt` (points the server answered), so Undo can take it back.
 */
export function useTrackEditing() {
  const points = shallowRef<TracePoint[]>([]);
  const saved = shallowRef<TracePoint[]>([]);
  const history = createHistory<TracePoint[]>();
  // The history object is not reactive; this counter makes canUndo/canRedo recompute after each change.
  const historyVersion = ref(0);

  const dirty = computed(() => !sameTrack(points.value, saved.value));
  const canUndo = computed(() => historyVersion.value >= 0 && history.canUndo());
  const canRedo = computed(() => historyVersion.value >= 0 && history.canRedo());

  function bump(): void {
    historyVersion.value += 1;
  }

  /** Starts afresh from a stored track (another flight, or none): no history, nothing unsaved. */
  function resetTrack(list: TracePoint[]): void {
    points.value = list;
    saved.value = list;
    history.clear();
    bump();
  }

  /** Applies a local edit under an undo label; an edit that returns the same array records nothing. */
  function edit(label: string, change: (list: TracePoint[]) => TracePoint[]): void {
    const before = points.value;
    const after = change(before);
    if (after === before) return;
    history.record(before, label);
    points.value = after;
    bump();
  }

  /** Takes the server's points as the saved track, keeping what was on screen for Undo (then Save keeps that). */
  function adopt(list: TracePoint[], label: string): void {
    history.record(points.value, label);
    points.value = list;
    saved.value = list;
    bump();
  }

  /** Marks the answer of a save as the saved track; the undo history stays, so an edit can still be taken back. */
  function markSaved(list: TracePoint[]): void {
    points.value = list;
    saved.value = list;
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

  return { points, saved, dirty, canUndo, canRedo, resetTrack, edit, adopt, markSaved, undo, redo };
}
