import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { AIM_HOLD_MS, useFrameTouch } from '../../../src/components/trace/use-frame-touch';
import type { Viewport } from '../../../src/components/trace/viewport';

/** A pointer event as far as the gestures read it: the id and the canvas position. */
function ev(pointerId: number, x: number, y: number): PointerEvent {
  return { pointerId, clientX: x, clientY: y } as PointerEvent;
}

function setup() {
  let view: Viewport = { scale: 1, offsetX: 0, offsetY: 0 };
  const taps: { x: number; y: number }[] = [];
  const touch = useFrameTouch({
    view: () => view,
    setView: (next) => (view = next),
    limits: () => ({ min: 0.25, max: 8 }),
    local: (e) => ({ x: e.clientX, y: e.clientY }),
    tap: (p) => taps.push(p),
    canAim: () => true,
    redraw: () => undefined,
  });
  return { touch, taps, view: () => view };
}

describe('useFrameTouch', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('takes a quick touch without travel as a tap where the finger went down', () => {
    const { touch, taps, view } = setup();
    touch.down(ev(1, 100, 80));
    touch.move(ev(1, 103, 82));
    touch.up(ev(1, 103, 82));
    expect(taps).toEqual([{ x: 100, y: 80 }]);
    expect(view()).toEqual({ scale: 1, offsetX: 0, offsetY: 0 });
  });

  it('pans with one finger dragged past the slop, and does not mark', () => {
    const { touch, taps, view } = setup();
    touch.down(ev(1, 100, 80));
    touch.move(ev(1, 130, 80));
    touch.move(ev(1, 150, 60));
    touch.up(ev(1, 150, 60));
    expect(taps).toEqual([]);
    expect(view()).toEqual({ scale: 1, offsetX: 50, offsetY: -20 });
  });

  it('aims after a rest: the magnifier follows the finger and the mark goes where it is lifted', () => {
    const { touch, taps } = setup();
    touch.down(ev(1, 100, 80));
    vi.advanceTimersByTime(AIM_HOLD_MS + 10);
    expect(touch.aimAt.value).toEqual({ x: 100, y: 80 });
    touch.move(ev(1, 140, 95));
    expect(touch.aimAt.value).toEqual({ x: 140, y: 95 });
    touch.up(ev(1, 140, 95));
    expect(taps).toEqual([{ x: 140, y: 95 }]);
    expect(touch.aimAt.value).toBeNull();
  });

  it('zooms with two fingers spread apart, without a tap, and carries on panning with the finger left', () => {
    const { touch, taps, view } = setup();
    touch.down(ev(1, 100, 100));
    touch.down(ev(2, 200, 100));
    touch.move(ev(1, 50, 100));
    touch.move(ev(2, 250, 100));
    expect(view().scale).toBeCloseTo(2, 10);
    touch.up(ev(2, 250, 100));
    const before = view();
    touch.move(ev(1, 60, 110));
    expect(view()).toEqual({ ...before, offsetX: before.offsetX + 10, offsetY: before.offsetY + 10 });
    touch.up(ev(1, 60, 110));
    expect(taps).toEqual([]);
  });

  it('drops a touch the browser cancelled', () => {
    const { touch, taps } = setup();
    touch.down(ev(1, 100, 80));
    touch.up(ev(1, 100, 80), true);
    expect(taps).toEqual([]);
  });
});
