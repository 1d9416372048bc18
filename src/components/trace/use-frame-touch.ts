import { computed, shallowRef } from 'vue';
import { isDrag, panBy, pinchViewport, type Vec2, type Viewport } from './viewport';

/** How long a finger rests still before the press turns into aiming with the magnifier, ms. */
export const AIM_HOLD_MS = 350;
/** Finger travel (screen px) that makes a press a drag-pan rather than a tap: fingers wobble more than a mouse. */
const TOUCH_SLOP = 10;

type TouchState =
  | { kind: 'press'; id: number; down: Vec2; last: Vec2 }
  | { kind: 'aim'; id: number; at: Vec2 }
  | { kind: 'pan'; id: number; last: Vec2 }
  | { kind: 'pinch'; ids: [number, number]; start: Viewport; a0: Vec2; b0: Vec2 };

/** What the frame viewer lends the touch gestures. */
export interface FrameTouchHost {
  view(): Viewport;
  setView(next: Viewport): void;
  limits(): { min: number; max: number };
  /** A pointer's position in canvas (screen) pixels. */
  local(e: PointerEvent): Vec2;
  /** A tap, or a finger lifted after aiming: what a click does with the mouse, at this screen point. */
  tap(screen: Vec2): void;
  /** Whether resting a finger aims (a mark can be placed now). */
  canAim(): boolean;
  redraw(): void;
}

/**
 * Touch on the frame viewer, from pointer events: one finger taps (a mark), drags (pans), or rests still and then
 * slides to aim with a magnifier above the fingertip, placing the mark where it is lifted; two fingers pinch to zoom
 * and drag to pan together. A second finger cancels a tap or an aim in progress.
 */
export function useFrameTouch(host: FrameTouchHost) {
  const fingers = new Map<number, Vec2>();
  const state = shallowRef<TouchState | null>(null);
  let holdTimer: ReturnType<typeof setTimeout> | null = null;

  /** The finger's screen position while aiming (the magnifier shows what is under it), else null. */
  const aimAt = computed(() => (state.value?.kind === 'aim' ? state.value.at : null));

  function stopHold(): void {
    if (holdTimer) clearTimeout(holdTimer);
    holdTimer = null;
  }

  function startPinch(): void {
    stopHold();
    const [[ia, a], [ib, b]] = [...fingers.entries()];
    state.value = { kind: 'pinch', ids: [ia, ib], start: host.view(), a0: a, b0: b };
    host.redraw();
  }

  function down(e: PointerEvent): void {
    const p = host.local(e);
    fingers.set(e.pointerId, p);
    if (fingers.size === 1) {
      state.value = { kind: 'press', id: e.pointerId, down: p, last: p };
      stopHold();
      holdTimer = setTimeout(() => {
        const s = state.value;
        if (s?.kind === 'press' && host.canAim()) {
          state.value = { kind: 'aim', id: s.id, at: s.last };
          host.redraw();
        }
      }, AIM_HOLD_MS);
    } else if (fingers.size === 2) {
      startPinch();
    }
  }

  function move(e: PointerEvent): void {
    if (!fingers.has(e.pointerId)) return;
    const p = host.local(e);
    fingers.set(e.pointerId, p);
    const s = state.value;
    if (!s) return;
    if (s.kind === 'press' && s.id === e.pointerId) {
      if (isDrag(s.down, p, TOUCH_SLOP)) {
        stopHold();
        host.setView(panBy(host.view(), p.x - s.down.x, p.y - s.down.y));
        state.value = { kind: 'pan', id: s.id, last: p };
      } else {
        state.value = { ...s, last: p };
      }
    } else if (s.kind === 'aim' && s.id === e.pointerId) {
      state.value = { ...s, at: p };
      host.redraw();
    } else if (s.kind === 'pan' && s.id === e.pointerId) {
      host.setView(panBy(host.view(), p.x - s.last.x, p.y - s.last.y));
      state.value = { ...s, last: p };
    } else if (s.kind === 'pinch') {
      const a = fingers.get(s.ids[0]);
      const b = fingers.get(s.ids[1]);
      if (a && b) host.setView(pinchViewport(s.start, s.a0, s.b0, a, b, host.limits()));
    }
  }

  function up(e: PointerEvent, cancelled = false): void {
    if (!fingers.has(e.pointerId)) return;
    fingers.delete(e.pointerId);
    const s = state.value;
    stopHold();
    if (s?.kind === 'pinch') {
      // One finger still down carries on as a drag-pan, so lifting the fingers one by one does not jump.
      const left = [...fingers.entries()][0];
      state.value = left ? { kind: 'pan', id: left[0], last: left[1] } : null;
      return;
    }
    state.value = null;
    if (!cancelled && s?.kind === 'press' && s.id === e.pointerId) host.tap(s.down);
    else if (!cancelled && s?.kind === 'aim' && s.id === e.pointerId) host.tap(s.at);
    host.redraw();
  }

  function reset(): void {
    stopHold();
    fingers.clear();
    state.value = null;
  }

  return { down, move, up, reset, aimAt };
}
