/**
 * Axis ranges that draw a trajectory at its true shape: one metre (or foot) takes the same number of pixels
 * across as up. ECharts stretches each axis to fill its grid, so the ranges themselves must carry the aspect of
 * the grid's plotting area; they are recomputed whenever that area changes size.
 */

export interface DataBox {
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

export interface PlotSize {
  /** Width of the grid's plotting area in CSS pixels (the chart's width less the grid's left and right margins). */
  width: number;
  /** Height of the plotting area in CSS pixels. */
  height: number;
}

export interface EqualAxes extends DataBox {
  /** Distance between ticks, the same on both axes (a 1, 2 or 5 times a power of ten). */
  step: number;
  /** Data units per pixel, equal on both axes. */
  unitsPerPixel: number;
}

export interface EqualScaleOptions {
  /** Room left around the data, as a fraction of its larger extent. */
  padFraction?: number;
  /** About how many pixels apart the ticks should be. */
  tickSpacingPx?: number;
  /** Keep y = 0 (the ground) as the bottom edge when every point lies above it. */
  groundAtZero?: boolean;
}

export const EQUAL_SCALE_DEFAULTS = { padFraction: 0.04, tickSpacingPx: 80, groundAtZero: true } as const;

/** The smallest of 1, 2, 5 × 10ⁿ that is at least `raw` (> 0). */
export function niceStep(raw: number): number {
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const power = 10 ** Math.floor(Math.log10(raw));
  const mantissa = raw / power;
  // Note: a small tolerance, so that 2.0000000001 × 10ⁿ from float noise does not jump to 5 × 10ⁿ.
  const pick = mantissa <= 1 + 1e-9 ? 1 : mantissa <= 2 + 1e-9 ? 2 : mantissa <= 5 + 1e-9 ? 5 : 10;
  return pick * power;
}

/** The smallest box holding every finite point; null when there is none. */
export function boxOf(points: readonly (readonly [number, number])[]): DataBox | null {
  let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (const [x, y] of points) {
    if (!Number.isFinite(x) || !Number.isFinite(y)) continue;
    xMin = Math.min(xMin, x); xMax = Math.max(xMax, x);
    yMin = Math.min(yMin, y); yMax = Math.max(yMax, y);
  }
  return xMin <= xMax ? { xMin, xMax, yMin, yMax } : null;
}

/**
 * Axis ranges with equal units per pixel on x and y that hold `box` in a plotting area of `size`.
 * The lower edges sit on a multiple of the common tick step (y on the ground when the data lie above it), so the
 * ticks fall on round numbers; the axis with room to spare extends to the right or upward.
 * Throws a RangeError for a plotting area with no width or height (a hidden chart): callers wait for a size.
 */
export function equalScaleAxes(box: DataBox, size: PlotSize, options: EqualScaleOptions = {}): EqualAxes {
  const { padFraction, tickSpacingPx, groundAtZero } = { ...EQUAL_SCALE_DEFAULTS, ...options };
  if (!(size.width > 0) || !(size.height > 0)) throw new RangeError('The plotting area has no size yet.');
  const spanX = Math.max(box.xMax - box.xMin, 0);
  const spanY = Math.max(box.yMax - box.yMin, 0);
  // A single point (or a flat line) still gets a visible window of a metre or so.
  const extent = Math.max(spanX, spanY, 1e-6) || 1;
  const pad = extent * padFraction;

  // Note: a flight integrated to the ground ends a hair below y = 0 (event location tolerance): still the ground.
  const tolerance = extent * 1e-6;
  const lowY = groundAtZero && box.yMin >= -tolerance ? 0 : box.yMin - pad;
  const highY = box.yMax + pad;
  // Data that start at the origin (the release over the calibration's origin) keep it as the left edge.
  const lowXRaw = box.xMin >= -tolerance && box.xMin - pad < 0 ? 0 : box.xMin - pad;
  const highX = box.xMax + pad;

  // First pass: units per pixel from the padded box gives the tick step; the lower edges then snap down to it,
  // which widens the box a little, so the scale is taken again from the snapped edges.
  let unitsPerPixel = Math.max((highX - lowXRaw) / size.width, (highY - lowY) / size.height);
  const step = niceStep(unitsPerPixel * tickSpacingPx);
  const xMin = Math.floor(lowXRaw / step) * step;
  const yMin = lowY === 0 ? 0 : Math.floor(lowY / step) * step;
  unitsPerPixel = Math.max((highX - xMin) / size.width, (highY - yMin) / size.height);
  return { xMin, xMax: xMin + unitsPerPixel * size.width, yMin, yMax: yMin + unitsPerPixel * size.height, step, unitsPerPixel };
}
