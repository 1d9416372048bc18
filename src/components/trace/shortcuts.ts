/**
 * Keyboard commands of the Trace screen: one table that both the key handler and the help popover read,
 * so the help can never list a key that does nothing.
 */

export type TraceCommand =
  | { kind: 'step'; delta: number }
  | { kind: 'first' }
  | { kind: 'last' }
  | { kind: 'prevPoint' }
  | { kind: 'nextPoint' }
  | { kind: 'undo' }
  | { kind: 'redo' }
  | { kind: 'deletePoint' }
  | { kind: 'zoomIn' }
  | { kind: 'zoomOut' }
  | { kind: 'zoomFit' }
  | { kind: 'zoomActual' }
  | { kind: 'jump' }
  | { kind: 'keyMark' }
  | { kind: 'help' }
  | { kind: 'cancel' };

/** The parts of a KeyboardEvent the mapping needs (so tests can pass plain objects). */
export interface KeyLike {
  key: string;
  shiftKey?: boolean;
  ctrlKey?: boolean;
  metaKey?: boolean;
  altKey?: boolean;
}

/** Frames moved by Shift + arrow. */
export const BIG_STEP = 10;
/** Image pixels the keyboard cursor moves with Shift + arrow (1 without). */
export const CURSOR_BIG_STEP = 10;

export interface ShortcutHelp {
  keys: string;
  does: string;
}

/** What the help popover lists, in groups, in the order shown. */
export const SHORTCUT_GROUPS: readonly { title: string; rows: readonly ShortcutHelp[] }[] = [
  {
    title: 'Frames',
    rows: [
      { keys: '← / →  or  , / .', does: 'Previous / next frame' },
      { keys: 'Shift + ← / →', does: `Back / forward ${BIG_STEP} frames` },
      { keys: 'Home / End', does: 'First / last frame' },
      { keys: '[ / ]', does: 'Previous / next marked frame' },
      { keys: 'G', does: 'Go to a frame number' },
    ],
  },
  {
    title: 'Marking by keys',
    rows: [
      { keys: 'M, or Enter on the frame', does: 'Start: a cursor on the frame' },
      { keys: '← ↑ → ↓', does: `Move the cursor 1 px (Shift: ${CURSOR_BIG_STEP} px)` },
      { keys: 'Enter', does: "Mark the ball at the cursor (moves this frame's mark)" },
      { keys: ', / .', does: 'Previous / next frame, the cursor staying put' },
      { keys: 'Esc', does: 'Stop (the arrows step frames again)' },
    ],
  },
  {
    title: 'Mouse',
    rows: [
      { keys: 'Click', does: 'Mark the ball centre' },
      { keys: 'Click + drag', does: 'Mark the centre and drag out the ball radius' },
      { keys: 'Wheel', does: 'Zoom about the pointer' },
      { keys: 'Space + drag, middle drag, Alt + drag', does: 'Pan' },
    ],
  },
  {
    title: 'Touch',
    rows: [
      { keys: 'Tap', does: 'Mark the ball centre' },
      { keys: 'Touch, hold, slide', does: 'Aim with the magnifier; lift to mark' },
      { keys: 'Pinch / drag', does: 'Zoom / pan' },
      { keys: 'Nudge arrows', does: "Move this frame's mark 1 px" },
    ],
  },
  {
    title: 'Track and view',
    rows: [
      { keys: 'Delete', does: 'Remove the mark on this frame' },
      { keys: 'Ctrl + Z / Ctrl + Shift + Z', does: 'Undo / redo' },
      { keys: '+ / − / 0 / 1', does: 'Zoom in / out / whole frame / actual pixels' },
      { keys: 'Esc', does: 'Drop a line started, close this help' },
      { keys: '?', does: 'Show or hide this help' },
    ],
  },
];

/** Every row of the help, in order. */
export const SHORTCUT_HELP: readonly ShortcutHelp[] = SHORTCUT_GROUPS.flatMap((g) => g.rows);

/** Maps a key press to a command, or null when the key is not one of the screen's. */
export function commandForKey(e: KeyLike): TraceCommand | null {
  const mod = Boolean(e.ctrlKey || e.metaKey);
  const key = e.key.length === 1 ? e.key.toLowerCase() : e.key;
  if (mod) {
    if (key === 'z') return e.shiftKey ? { kind: 'redo' } : { kind: 'undo' };
    if (key === 'y') return { kind: 'redo' };
    return null;
  }
  if (e.altKey) return null;
  switch (key) {
    case 'ArrowLeft':
      return { kind: 'step', delta: e.shiftKey ? -BIG_STEP : -1 };
    case 'ArrowRight':
      return { kind: 'step', delta: e.shiftKey ? BIG_STEP : 1 };
    case 'Home':
      return { kind: 'first' };
    case 'End':
      return { kind: 'last' };
    case '[':
      return { kind: 'prevPoint' };
    case ']':
      return { kind: 'nextPoint' };
    case 'Delete':
    case 'Backspace':
      return { kind: 'deletePoint' };
    case '+':
    case '=':
      return { kind: 'zoomIn' };
    case '-':
    case '_':
      return { kind: 'zoomOut' };
    case '0':
      return { kind: 'zoomFit' };
    case '1':
      return { kind: 'zoomActual' };
    case ',':
      return { kind: 'step', delta: -1 };
    case '.':
      return { kind: 'step', delta: 1 };
    case 'g':
      return { kind: 'jump' };
    case 'm':
      return { kind: 'keyMark' };
    case '?':
      return { kind: 'help' };
    case 'Escape':
      return { kind: 'cancel' };
    default:
      return null;
  }
}

/** Roles of widgets that use the arrow keys themselves (the frame slider, drop-downs, number spinners). */
const OWN_KEY_ROLES = ['slider', 'combobox', 'listbox', 'option', 'spinbutton', 'menu', 'menuitem', 'textbox'];

/**
 * Whether a key event came from a place where keys must not be taken as commands: inputs, editors, and widgets
 * that use the arrows themselves (a focused slider would otherwise step twice).
 */
export function isTypingTarget(
  target: { tagName?: string; isContentEditable?: boolean; type?: string; getAttribute?: (name: string) => string | null } | null,
): boolean {
  if (!target) return false;
  if (target.isContentEditable) return true;
  const role = target.getAttribute?.('role');
  if (role && OWN_KEY_ROLES.includes(role)) return true;
  const tag = (target.tagName ?? '').toUpperCase();
  if (tag === 'TEXTAREA' || tag === 'SELECT') return true;
  if (tag === 'INPUT') {
    const type = (target.type ?? 'text').toLowerCase();
    return !['checkbox', 'radio', 'button', 'range', 'submit', 'reset'].includes(type);
  }
  return false;
}
