import { describe, expect, it } from 'vitest';
import { BIG_STEP, commandForKey, isTypingTarget, SHORTCUT_HELP } from '../../../src/components/trace/shortcuts';

describe('commandForKey', () => {
  it('steps one frame with the arrows and ten with Shift held', () => {
    expect(commandForKey({ key: 'ArrowRight' })).toEqual({ kind: 'step', delta: 1 });
    expect(commandForKey({ key: 'ArrowLeft' })).toEqual({ kind: 'step', delta: -1 });
    expect(commandForKey({ key: 'ArrowRight', shiftKey: true })).toEqual({ kind: 'step', delta: BIG_STEP });
    expect(commandForKey({ key: 'ArrowLeft', shiftKey: true })).toEqual({ kind: 'step', delta: -BIG_STEP });
  });

  it('undoes with Ctrl+Z or Cmd+Z and redoes with Shift or Y', () => {
    expect(commandForKey({ key: 'z', ctrlKey: true })).toEqual({ kind: 'undo' });
    expect(commandForKey({ key: 'z', metaKey: true })).toEqual({ kind: 'undo' });
    expect(commandForKey({ key: 'Z', ctrlKey: true, shiftKey: true })).toEqual({ kind: 'redo' });
    expect(commandForKey({ key: 'y', ctrlKey: true })).toEqual({ kind: 'redo' });
  });

  it('leaves other browser shortcuts alone when a modifier is held', () => {
    expect(commandForKey({ key: 'r', ctrlKey: true })).toBeNull();
    expect(commandForKey({ key: 'ArrowLeft', altKey: true })).toBeNull();
    expect(commandForKey({ key: 'q' })).toBeNull();
  });

  it('maps Home, End, Delete and the zoom keys to their commands', () => {
    expect(commandForKey({ key: 'Home' })?.kind).toBe('first');
    expect(commandForKey({ key: 'End' })?.kind).toBe('last');
    expect(commandForKey({ key: 'Delete' })?.kind).toBe('deletePoint');
    expect(commandForKey({ key: '+' })?.kind).toBe('zoomIn');
    expect(commandForKey({ key: '-' })?.kind).toBe('zoomOut');
    expect(commandForKey({ key: '0' })?.kind).toBe('zoomFit');
    expect(commandForKey({ key: 'G' })?.kind).toBe('jump');
  });

  it('steps frames with comma and full stop too (the arrows move the cursor while marking by keys) and marks by keys with M', () => {
    expect(commandForKey({ key: ',' })).toEqual({ kind: 'step', delta: -1 });
    expect(commandForKey({ key: '.' })).toEqual({ kind: 'step', delta: 1 });
    expect(commandForKey({ key: 'M' })).toEqual({ kind: 'keyMark' });
    expect(SHORTCUT_HELP.some((h) => h.keys.startsWith('M'))).toBe(true);
    expect(SHORTCUT_HELP.some((h) => h.keys.includes('Enter') && h.does.includes('cursor'))).toBe(true);
  });

  it('lists in the help only keys that the mapping knows when the popover is built', () => {
    const singles = SHORTCUT_HELP.flatMap((h) => h.keys.split(/\s*\/\s*/)).filter((k) => /^[[\]?G]$/.test(k));
    for (const k of singles) expect(commandForKey({ key: k })).not.toBeNull();
  });
});

describe('isTypingTarget', () => {
  it('treats text inputs and editors as typing places and buttons as not', () => {
    expect(isTypingTarget({ tagName: 'INPUT', type: 'number' })).toBe(true);
    expect(isTypingTarget({ tagName: 'textarea' })).toBe(true);
    expect(isTypingTarget({ tagName: 'DIV', isContentEditable: true })).toBe(true);
    expect(isTypingTarget({ tagName: 'INPUT', type: 'checkbox' })).toBe(false);
    expect(isTypingTarget({ tagName: 'BUTTON' })).toBe(false);
    expect(isTypingTarget(null)).toBe(false);
  });

  it('leaves the arrows to widgets that use them when a slider or drop-down has the focus', () => {
    const withRole = (role: string) => ({ tagName: 'SPAN', getAttribute: (name: string) => (name === 'role' ? role : null) });
    expect(isTypingTarget(withRole('slider'))).toBe(true);
    expect(isTypingTarget(withRole('combobox'))).toBe(true);
    expect(isTypingTarget(withRole('button'))).toBe(false);
  });
});
