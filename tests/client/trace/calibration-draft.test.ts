import { describe, expect, it, vi } from 'vitest';
import { ref, shallowRef } from 'vue';
import type { Clip } from '../../../src/api/clips';
import { useCalibrationDraft } from '../../../src/components/trace/use-calibration-draft';

vi.mock('@/api/clips', () => ({ saveCalibration: vi.fn(), deleteCalibration: vi.fn() }));

const corners = [
  { x: 100, y: 300 },
  { x: 400, y: 320 },
  { x: 400, y: 150 },
  { x: 100, y: 170 },
];

function planeDraft() {
  const draft = useCalibrationDraft(shallowRef<Clip | null>(null), ref(1), ref(0));
  draft.setMethod('plane');
  return draft;
}

describe('useCalibrationDraft with the plane method', () => {
  it('adds the corners in the order clicked, one past the last at a time, and moves a placed one', () => {
    const d = planeDraft();
    d.moveHandle('plane.1', corners[1]!);
    expect(d.draft.value.corners).toEqual([]);
    corners.forEach((c, i) => d.moveHandle(`plane.${i as 0 | 1 | 2 | 3}`, c));
    expect(d.draft.value.corners).toEqual(corners);
    d.moveHandle('plane.2', { x: 410, y: 150 });
    expect(d.draft.value.corners[2]).toEqual({ x: 410, y: 150 });
    d.clearCorners();
    expect(d.draft.value.corners).toEqual([]);
  });

  it('makes a plane body once the four corners, the size and the origin are there, and previews its mapping', () => {
    const d = planeDraft();
    corners.forEach((c, i) => d.moveHandle(`plane.${i as 0 | 1 | 2 | 3}`, c));
    d.setOrigin({ x: 60, y: 298 });
    expect(d.draftInput.value).toBeNull();
    d.draft.value = { ...d.draft.value, planeWidthM: 8, planeHeightM: 3 };
    expect(d.draftInput.value).toMatchObject({ method: 'plane', plane: { widthM: 8, heightM: 3, corners: corners.map((c) => ({ xPx: c.x, yPx: c.y })) } });
    expect(d.draftFrame.value?.method).toBe('plane');
    expect(d.draftFrame.value?.homography).not.toBeNull();
  });

  it('keeps the two-point parts apart: switching back makes a scale body from them', () => {
    const d = planeDraft();
    d.setLine('scale', { a: { x: 0, y: 300 }, b: { x: 200, y: 300 } });
    d.setOrigin({ x: 0, y: 300 });
    d.draft.value = { ...d.draft.value, distanceM: 10 };
    expect(d.draftInput.value).toBeNull();
    d.setMethod('scale');
    expect(d.draftInput.value).toMatchObject({ method: 'scale', scale: { distanceM: 10 } });
    expect(d.draftFrame.value?.metresPerPixel).toBe(0.05);
  });
});
