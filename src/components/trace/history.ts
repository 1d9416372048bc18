/**
 * Undo/redo of the Trace screen's edits. Keeps whole snapshots rather than inverse operations: a track is a few
 * hundred points at most, so a snapshot is cheap and an undo can never drift from what was on screen.
 * Snapshots must be treated as immutable by the caller (every edit in track-edit.ts returns a new array).
 */
export interface History<T> {
  /** Remembers `before` as the state to return to; clears the redo side. Call it before applying an edit. */
  record(before: T, label?: string): void;
  /** Returns the state before the last edit, remembering `current` for redo; undefined when nothing is left. */
  undo(current: T): T | undefined;
  /** Returns the state undone last, remembering `current` for undo; undefined when nothing is left. */
  redo(current: T): T | undefined;
  canUndo(): boolean;
  canRedo(): boolean;
  /** The label of the edit that `undo` would take back. */
  undoLabel(): string | undefined;
  clear(): void;
  size(): number;
}

/** Number of edits kept when no limit is given. */
export const HISTORY_DEFAULT_LIMIT = 200;

interface Entry<T> {
  state: T;
  label?: string;
}

export function createHistory<T>(limit: number = HISTORY_DEFAULT_LIMIT): History<T> {
  if (!Number.isInteger(limit) || limit < 1) throw new RangeError('History limit must be a whole number of at least 1.');
  let past: Entry<T>[] = [];
  let future: Entry<T>[] = [];

  return {
    record(before, label) {
      past.push({ state: before, label });
      if (past.length > limit) past = past.slice(past.length - limit);
      future = [];
    },
    undo(current) {
      const entry = past.pop();
      if (!entry) return undefined;
      future.push({ state: current, label: entry.label });
      return entry.state;
    },
    redo(current) {
      const entry = future.pop();
      if (!entry) return undefined;
      past.push({ state: current, label: entry.label });
      return entry.state;
    },
    canUndo: () => past.length > 0,
    canRedo: () => future.length > 0,
    undoLabel: () => past[past.length - 1]?.label,
    clear() {
      past = [];
      future = [];
    },
    size: () => past.length,
  };
}
