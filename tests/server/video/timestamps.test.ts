import { describe, expect, it } from 'vitest';
import { analyseTimestamps } from '../../../server/video/timestamps';
import { VideoError } from '../../../server/video/index';

const at = (times: number[]) => times.map((t) => ({ pts: t, dts: t }));

describe('analyseTimestamps', () => {
  it("calls evenly spaced timestamps constant, within a millisecond clock's rounding", () => {
    const timing = analyseTimestamps(at(Array.from({ length: 30 }, (_, i) => Math.round((i / 60) * 1000) / 1000)));
    expect(timing.constant).toBe(true);
    expect(timing.warning).toBeNull();
  });

  it('puts frames in presentation order when a codec reorders them, without calling that backwards', () => {
    // Decode order I P B B P B B of a stream with B-frames, at 0.04 s a frame.
    const pts = [0, 3, 1, 2, 6, 4, 5].map((f) => f * 0.04);
    const timing = analyseTimestamps(pts.map((p, i) => ({ pts: p, dts: (i - 2) * 0.04 })));
    expect(timing.timesS!.map((t) => Math.round(t / 0.04))).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(timing.constant).toBe(true);
  });

  it('throws VIDEO_TIMESTAMPS_BACKWARDS when a decode timestamp goes back', () => {
    const packets = at([0, 0.04, 0.08, 0.12]);
    packets[2]!.dts = 0.01;
    expect(() => analyseTimestamps(packets)).toThrowError(VideoError);
    expect(() => analyseTimestamps(packets)).toThrow(/The clip's timestamps go backwards: frame 2 in the file is stamped 0\.010 s, before the 0\.040 s/);
  });

  it("falls back to the frame rate, with a warning, when frames have no timestamp", () => {
    const timing = analyseTimestamps([...at([0, 0.04]), { pts: null, dts: null }, ...at([0.08, 0.12])]);
    expect(timing.warning).toBe('1 frame has no timestamp, so times come from the frame rate instead.');
    expect(timing.timesS).toBeNull();
  });
});
