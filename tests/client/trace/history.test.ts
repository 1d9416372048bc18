import { describe, expect, it } from 'vitest';
import { createHistory } from '../../../src/components/trace/history';

describe('createHistory', () => {
  it('undoes edits in reverse order and redoes them forward when asked', () => {
    const h = createHistory<string[]>();
    let state: string[] = [];
    const edit = (next: string[], label: string) => {
      h.record(state, label);
      state = next;
    };
    edit(['a'], 'place a');
    edit(['a', 'b'], 'place b');
    edit(['b'], 'delete a');
    expect(h.undoLabel()).toBe('delete a');

    state = h.undo(state) ?? state;
    expect(state).toEqual(['a', 'b']);
    state = h.undo(state) ?? state;
    expect(state).toEqual(['a']);
    expect(h.canRedo()).toBe(true);
    state = h.redo(state) ?? state;
    expect(state).toEqual(['a', 'b']);
    state = h.redo(state) ?? state;
    expect(state).toEqual(['b']);
    expect(h.canRedo()).toBe(false);
  });

  it('returns undefined and keeps the state when there is nothing to undo or redo', () => {
    const h = createHistory<number>();
    expect(h.undo(5)).toBeUndefined();
    expect(h.redo(5)).toBeUndefined();
    expect(h.canUndo()).toBe(false);
  });

  it('drops the redo side when a new edit follows an undo', () => {
    const h = createHistory<number>();
    h.record(0);
    h.record(1);
    const back = h.undo(2);
    expect(back).toBe(1);
    h.record(1, 'other');
    expect(h.canRedo()).toBe(false);
    expect(h.undo(7)).toBe(1);
    expect(h.undo(1)).toBe(0);
  });

  it('forgets the oldest edits when the limit is reached', () => {
    const h = createHistory<number>(3);
    for (let i = 0; i < 10; i += 1) h.record(i);
    expect(h.size()).toBe(3);
    expect(h.undo(10)).toBe(9);
    expect(h.undo(9)).toBe(8);
    expect(h.undo(8)).toBe(7);
    expect(h.undo(7)).toBeUndefined();
  });

  it('refuses a limit below one when created', () => {
    expect(() => createHistory(0)).toThrow(/at least 1/);
  });

  it('empties both sides when cleared', () => {
    const h = createHistory<number>();
    h.record(1);
    h.undo(2);
    h.clear();
    expect(h.canUndo()).toBe(false);
    expect(h.canRedo()).toBe(false);
  });
});
