/**
 * The metrics table of the Flight report: what a stored fit measured, each value with its standard error where the
 * engine gives one, in the club's display units (src/utils/units.ts does every conversion).
 */
import type { DragRegime, FitResult } from '../../../shared/physics';
import { displayUnit, formatQuantity, type Quantity, type UnitSystem } from '../../utils/units';

export interface MetricRow {
  /** Stable key, e.g. `launchSpeed` (tests and the page's data-metric attribute). */
  key: string;
  label: string;
  value: string;
  /** A plain-language line under the label, when the number needs one. */
  hint?: string;
}

export interface MetricGroup {
  title: string;
  rows: MetricRow[];
}

const MISSING = '—';

/**
 * Decimal places that show an error to one significant figure: never fewer than `base` (the unit's own) and at
 * most `base + 3`, so that a tiny error reads "± 0.004" rather than "± 0.0" without spilling float noise.
 */
export function digitsForError(error: number | null | undefined, base: number): number {
  if (error === null || error === undefined || !Number.isFinite(error) || error <= 0) return base;
  return Math.min(base + 3, Math.max(base, -Math.floor(Math.log10(error))));
}

/** A measured value with its one-standard-error band, e.g. "27.3 ± 0.4 m/s" or "19.53 ± 0.02 m/s". */
export function formatWithError(value: number | null | undefined, error: number | null | undefined, quantity: Quantity, units: UnitSystem): string {
  const shown = formatQuantity(value, quantity, units);
  if (shown === MISSING || error === null || error === undefined || !Number.isFinite(error)) return shown;
  // Note: an error converts like the value only for units without an offset (lengths, speeds; not °C or °F).
  const unit = displayUnit(quantity, units);
  const digits = digitsForError(unit.fromSi(error), unit.digits);
  const bare = formatQuantity(value, quantity, units, { bare: true, digits });
  const err = formatQuantity(error, quantity, units, { digits });
  return `${bare} ± ${err}`;
}

/** A plain number with its error, e.g. C_d "0.24 ± 0.03". */
export function formatNumberWithError(value: number | null | undefined, error: number | null | undefined, digits: number, suffix = ''): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return MISSING;
  const hasError = error !== null && error !== undefined && Number.isFinite(error);
  const d = hasError ? digitsForError(error, digits) : digits;
  const base = (Number(value.toFixed(d)) + 0).toFixed(d);
  if (!hasError) return `${base}${suffix}`;
  return `${base} ± ${(Number(error.toFixed(d)) + 0).toFixed(d)}${suffix}`;
}

/** A Reynolds number in scientific notation, "2.1 × 10⁵". */
export function formatReynolds(re: number | null | undefined): string {
  if (re === null || re === undefined || !Number.isFinite(re) || re <= 0) return MISSING;
  const exponent = Math.floor(Math.log10(re));
  const mantissa = re / 10 ** exponent;
  const superscript = String(exponent).replace(/[-0-9]/g, (c) => '⁻⁰¹²³⁴⁵⁶⁷⁸⁹'['-0123456789'.indexOf(c)]);
  return `${mantissa.toFixed(1)} × 10${superscript}`;
}

export const REGIME_WORDS: Record<DragRegime, string> = {
  creeping: 'creeping flow: drag grows with speed (Stokes)',
  intermediate: 'intermediate: between creeping flow and the quadratic law',
  subcritical: 'subcritical: drag grows with the square of speed, before the drag crisis',
  critical: 'in the drag crisis: C_d falls sharply with speed here',
  supercritical: 'supercritical: past the drag crisis, lower C_d',
};

const MODEL_WORDS: Record<string, string> = {
  vacuum: 'no air (parabola)',
  linear: 'linear drag',
  drag: 'quadratic drag',
  'drag-lift': 'quadratic drag with lift (spin)',
};

export function modelWords(model: string): string {
  return MODEL_WORDS[model] ?? model;
}

function seconds(value: number | null | undefined, error?: number | null): string {
  return formatNumberWithError(value, error ?? null, 2, ' s');
}

/** The report's table: launch, air, flight, comparison and fit quality, in that order. */
export function metricGroups(r: FitResult, units: UnitSystem, meta: { engineVersion: string }): MetricGroup[] {
  const f = r.flight;
  const quadratic = r.model === 'drag' || r.model === 'drag-lift';

  const launch: MetricRow[] = [
    { key: 'launchSpeed', label: 'Launch speed', value: formatWithError(r.launch.speed, r.launch.speedError, 'speed', units) },
    { key: 'launchAngle', label: 'Launch angle', value: formatNumberWithError(r.launch.angleDeg, r.launch.angleDegError, 1, '°') },
    { key: 'launchHeight', label: 'Launch height', value: formatWithError(r.launch.height, r.launch.heightError, 'length', units) },
  ];
  // Fits of engines before 1.1 carry no release: their launch is the first traced point.
  const release = r.release;
  if (release && release.mode !== 'first-point') {
    const back = release.backFrames !== null ? `${release.backFrames.toFixed(1)} frames` : seconds(release.backTime);
    launch.push({
      key: 'release',
      label: 'Release',
      value: release.mode === 'time' ? `marked frame, ${back} before the first mark` : `at the given height, ${back} before the first mark`,
      hint: 'The launch figures are those of the release: the fitted flight traced back from the first mark.',
    });
  }

  const air: MetricRow[] = [];
  if (quadratic) air.push({ key: 'cd', label: 'Drag coefficient C_d', value: formatNumberWithError(r.cd, r.cdError, 2) });
  if (r.model === 'drag-lift') {
    air.push({ key: 'cl', label: 'Lift coefficient C_L', value: formatNumberWithError(r.cl, r.clError, 2), hint: 'Positive: backspin lifts the ball; negative: topspin.' });
  }
  if (r.model === 'linear') air.push({ key: 'dragRate', label: 'Linear drag rate β', value: formatNumberWithError(r.dragRate, r.dragRateError, 3, ' 1/s') });
  air.push(
    {
      key: 'reynolds',
      label: 'Reynolds number at launch',
      value: formatReynolds(r.reynolds),
      hint: r.regime ? REGIME_WORDS[r.regime] : undefined,
    },
    { key: 'terminalSpeed', label: 'Terminal speed', value: formatQuantity(r.terminalSpeed, 'speed', units), hint: 'The falling speed at which drag would equal the weight.' },
    {
      key: 'dragToWeight',
      label: 'Drag-to-weight at launch',
      value: r.dragToWeight === null || !Number.isFinite(r.dragToWeight) ? MISSING : r.dragToWeight.toFixed(2),
      hint: 'Drag force over the ball\'s weight: above about 0.1 the air shapes the flight.',
    },
  );

  const flight: MetricRow[] = [
    { key: 'apexHeight', label: 'Apex height', value: formatWithError(f.apexHeight, r.errors.apexHeight, 'length', units) },
    { key: 'apexTime', label: 'Apex time', value: seconds(f.apexTime, r.errors.apexTime) },
    { key: 'timeUpDown', label: 'Time up / time down', value: `${seconds(f.timeUp)} / ${seconds(f.timeDown)}`, hint: 'Air makes the way down longer than the way up.' },
    { key: 'hangTime', label: 'Hang time', value: seconds(f.flightTime, r.errors.flightTime) },
    { key: 'carry', label: 'Carry', value: formatWithError(f.carry, r.errors.carry, 'length', units) },
    { key: 'landingSpeed', label: 'Landing speed', value: formatWithError(f.landingSpeed, r.errors.landingSpeed, 'speed', units) },
    { key: 'landingAngle', label: 'Landing angle', value: formatNumberWithError(f.landingAngleDeg, null, 1, '° below horizontal') },
    { key: 'horizontalSpeedLost', label: 'Horizontal speed lost', value: formatQuantity(f.horizontalSpeedLost, 'speed', units) },
  ];

  const comparison: MetricRow[] = [
    { key: 'vacuumCarry', label: 'Carry with no air', value: formatQuantity(r.vacuum.carry, 'length', units), hint: 'The same launch as a parabola.' },
    {
      key: 'standardCarry',
      label: 'Standard-conditions carry',
      value: formatWithError(r.standardCarry, r.errors.standardCarry, 'length', units),
      // ISO 2533:1975 standard atmosphere at sea level: 288.15 K, 101 325 Pa.
      hint: `The same launch in still sea-level standard air (${formatQuantity(288.15, 'temperature', units, { digits: 0 })}, ${formatQuantity(101325, 'pressure', units)}), for fair comparison across days.`,
    },
  ];

  const quality: MetricRow[] = [
    { key: 'rms', label: 'Distance of points from the fit (rms)', value: formatQuantity(r.rms, 'shortLength', units) },
    { key: 'points', label: 'Points fitted', value: r.outliers.length ? `${r.points} (${r.outliers.length} set aside)` : String(r.points) },
    { key: 'model', label: 'Model', value: modelWords(r.model) },
    { key: 'engine', label: 'Engine version', value: meta.engineVersion },
  ];
  if (r.scaleCheck) {
    quality.push({
      key: 'scaleCheck',
      label: 'Gravity check of the scale',
      value: formatNumberWithError(r.scaleCheck.factor, r.scaleCheck.error, 3, ` × g (${r.scaleCheck.status})`),
    });
  }

  return [
    { title: 'Launch', rows: launch },
    { title: 'Air', rows: air },
    { title: 'Flight', rows: flight },
    { title: 'For comparison', rows: comparison },
    { title: 'Fit', rows: quality },
  ];
}

export type WarningTone = 'info' | 'caution';

const WARNING_TITLES: Record<string, { title: string; tone: WarningTone }> = {
  NEGATIVE_CD: { title: 'Drag came out negative', tone: 'caution' },
  CD_PRIOR_USED: { title: 'Drag taken partly from the ball catalogue', tone: 'info' },
  CD_OUTSIDE_RANGE: { title: 'Drag outside the usual range for this ball', tone: 'caution' },
  SCALE_DISAGREES: { title: 'The calibration and gravity disagree', tone: 'caution' },
  SCALE_UNCHECKED: { title: 'Scale not cross-checked against gravity', tone: 'info' },
  EXTRAPOLATED: { title: 'Landing extrapolated beyond the traced part', tone: 'info' },
  OUTLIERS_DOWNWEIGHTED: { title: 'Some points were set aside', tone: 'caution' },
  NOT_CONVERGED: { title: 'The fit did not settle', tone: 'caution' },
  POORLY_DETERMINED: { title: 'A value is poorly determined', tone: 'caution' },
  NEAR_DRAG_CRISIS: { title: 'Near the drag crisis', tone: 'info' },
  NEVER_RISES: { title: 'Released downward', tone: 'info' },
  LARGE_LIFT: { title: 'Unusually large lift', tone: 'caution' },
  AIR_ASSUMED: { title: 'Standard air assumed', tone: 'info' },
  LINEAR_DRAG_UNUSUAL: { title: 'Linear drag is unusual for this ball', tone: 'caution' },
  MOVING_CAMERA: { title: 'Moving camera', tone: 'info' },
};

/** A heading and tone for a fit warning; the engine's own message carries the plain-language explanation. */
export function warningView(code: string): { title: string; tone: WarningTone } {
  return WARNING_TITLES[code] ?? { title: 'Note on this fit', tone: 'caution' };
}

/**
 * The figures a coach reads first (carry, launch speed and angle, apex, hang time), without their errors: the
 * report opens with them, above the charts, so that a phone shows them without scrolling. The table keeps the errors.
 */
export function headlineFigures(r: FitResult, units: UnitSystem): MetricRow[] {
  const f = r.flight;
  return [
    { key: 'carry', label: 'Carry', value: formatQuantity(f.carry, 'length', units) },
    { key: 'launchSpeed', label: 'Launch speed', value: formatQuantity(r.launch.speed, 'speed', units) },
    { key: 'launchAngle', label: 'Launch angle', value: formatNumberWithError(r.launch.angleDeg, null, 1, '°') },
    { key: 'apexHeight', label: 'Apex', value: formatQuantity(f.apexHeight, 'length', units) },
    { key: 'hangTime', label: 'Hang time', value: seconds(f.flightTime) },
  ];
}
