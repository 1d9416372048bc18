/**
 * Ball catalogue: the rulebook's mass and size ranges, a nominal value, and a typical drag
 * coefficient range with its published source.
 *
 * `confirmed: false` marks values written down from memory of the named source, not checked
 * against the text here; their tolerance is stated in `note`. Clubs may add their own balls as
 * plain {@link BallProps}.
 */
import { PhysicsError } from './errors';

/** A closed range with the value used when nothing better is known. */
export interface NominalRange {
  min: number;
  max: number;
  nominal: number;
}

/** Where a value comes from. */
export interface SourceNote {
  /** Body or authors, title, year, section. */
  source: string;
  /** False where the value was written down from memory and not checked against the source here. */
  confirmed: boolean;
  note?: string;
}

/** What the physics needs of a ball. */
export interface BallProps {
  /** Mass m (kg), > 0. */
  massKg: number;
  /** Diameter D (m), > 0; for a non-spherical ball, the diameter of its reference area (widest section). */
  diameterM: number;
  /** Typical drag coefficient range, used as the prior when a track cannot pin C_d down. */
  cdRange?: { min: number; max: number };
  /** Reynolds band of this ball's drag crisis (rough and seamed balls fall earlier than a smooth sphere). */
  crisisReynolds?: readonly [number, number];
  /** A name for reports. */
  name?: string;
}

export interface BallSpec {
  id: string;
  name: string;
  sport: string;
  shape: 'sphere' | 'prolate spheroid';
  /** Mass (kg): the rulebook range and the value used by default. */
  massKg: NominalRange;
  /** Diameter (m) of the reference area: from the rule (circumference / π where the rule gives a circumference). */
  diameterM: NominalRange;
  /** The size rule as written (m): what is measured, and its range. */
  sizeRule: { quantity: 'circumference' | 'diameter' | 'length' | 'width circumference'; min: number; max: number };
  rule: SourceNote;
  /** Typical C_d range in play and the value used to start a fit. */
  cd: NominalRange & SourceNote;
  /** Reynolds band of the drag crisis, when the ball's differs from a smooth sphere's. */
  crisisReynolds?: readonly [number, number];
  /** Caution to show with this ball, if any. */
  caution?: string;
}

const OZ = 0.028349523125; // kg, international avoirdupois ounce
const INCH = 0.0254; // m

function circ(min: number, max: number): { diameterM: NominalRange; sizeRule: BallSpec['sizeRule'] } {
  return {
    diameterM: { min: min / Math.PI, max: max / Math.PI, nominal: (min + max) / (2 * Math.PI) },
    sizeRule: { quantity: 'circumference', min, max },
  };
}

/** The catalogue, keyed by id. */
export const BALLS: Readonly<Record<string, BallSpec>> = Object.freeze({
  'football-5': {
    id: 'football-5', name: 'Association football, size 5', sport: 'association football', shape: 'sphere',
    massKg: { min: 0.41, max: 0.45, nominal: 0.43 },
    ...circ(0.68, 0.7),
    rule: { source: 'IFAB Laws of the Game, Law 2 (The Ball)', confirmed: false, note: 'from memory; exact to the gram and centimetre' },
    cd: { min: 0.2, max: 0.3, nominal: 0.25, source: 'Asai et al., Sports Engineering 10 (2007) 101; Goff & Carré, Am. J. Phys. 77 (2009) 1020 (above the drag crisis)', confirmed: false, note: 'from memory; below the crisis (slow balls) C_d rises towards 0.45' },
    crisisReynolds: [1.5e5, 3.5e5],
  },
  tennis: {
    id: 'tennis', name: 'Tennis ball', sport: 'tennis', shape: 'sphere',
    massKg: { min: 0.056, max: 0.0594, nominal: 0.0577 },
    diameterM: { min: 0.0654, max: 0.0686, nominal: 0.067 },
    sizeRule: { quantity: 'diameter', min: 0.0654, max: 0.0686 },
    rule: { source: 'ITF Rules of Tennis, Appendix I', confirmed: false, note: 'from memory; types 1–3 together' },
    cd: { min: 0.5, max: 0.65, nominal: 0.55, source: 'Mehta & Pallis, "The aerodynamics of a tennis ball", Sports Engineering 4 (2001) 177', confirmed: false, note: 'nominal 0.55 as published; range from memory ±0.05' },
  },
  volleyball: {
    id: 'volleyball', name: 'Volleyball (indoor)', sport: 'volleyball', shape: 'sphere',
    massKg: { min: 0.26, max: 0.28, nominal: 0.27 },
    ...circ(0.65, 0.67),
    rule: { source: 'FIVB Official Volleyball Rules, rule 3', confirmed: false, note: 'from memory' },
    cd: { min: 0.15, max: 0.5, nominal: 0.3, source: 'Mehta, "Aerodynamics of sports balls", Annu. Rev. Fluid Mech. 17 (1985) 151 (crisis of panelled balls)', confirmed: false, note: 'from memory: low above the crisis (spin serve), high below it (float serve)' },
    crisisReynolds: [1.5e5, 3.5e5],
  },
  'basketball-7': {
    id: 'basketball-7', name: 'Basketball, size 7', sport: 'basketball', shape: 'sphere',
    massKg: { min: 0.567, max: 0.65, nominal: 0.6 },
    ...circ(0.749, 0.78),
    rule: { source: 'FIBA Official Basketball Rules (basketball equipment)', confirmed: false, note: 'from memory' },
    cd: { min: 0.45, max: 0.55, nominal: 0.5, source: 'Hoerner, Fluid-Dynamic Drag (1965): rough sphere, subcritical', confirmed: false, note: 'from memory ±0.05; shots stay below the crisis' },
  },
  baseball: {
    id: 'baseball', name: 'Baseball', sport: 'baseball', shape: 'sphere',
    massKg: { min: 5 * OZ, max: 5.25 * OZ, nominal: 5.125 * OZ },
    ...circ(9 * INCH, 9.25 * INCH),
    rule: { source: 'Official Baseball Rules, rule 3.01', confirmed: false, note: 'from memory: 5–5¼ oz, 9–9¼ in' },
    cd: { min: 0.3, max: 0.5, nominal: 0.35, source: 'Nathan, "The effect of spin on the flight of a baseball", Am. J. Phys. 76 (2008) 119', confirmed: true, note: 'range as in the project references; depends on speed and spin' },
    crisisReynolds: [1e5, 2e5],
  },
  'cricket-men': {
    id: 'cricket-men', name: "Cricket ball, men's", sport: 'cricket', shape: 'sphere',
    massKg: { min: 0.1559, max: 0.163, nominal: 0.1595 },
    ...circ(0.224, 0.229),
    rule: { source: 'MCC Laws of Cricket, Law 4 (The ball)', confirmed: false, note: 'from memory' },
    cd: { min: 0.35, max: 0.5, nominal: 0.4, source: 'Mehta, "Aerodynamics of sports balls", Annu. Rev. Fluid Mech. 17 (1985) 151', confirmed: false, note: 'from memory ±0.05; seam orientation moves it' },
    crisisReynolds: [1e5, 2.5e5],
  },
  'handball-3': {
    id: 'handball-3', name: 'Handball, size 3', sport: 'handball', shape: 'sphere',
    massKg: { min: 0.425, max: 0.475, nominal: 0.45 },
    ...circ(0.58, 0.6),
    rule: { source: 'IHF Rules of the Game, rule 3', confirmed: false, note: 'from memory' },
    cd: { min: 0.3, max: 0.5, nominal: 0.4, source: 'Mehta, "Aerodynamics of sports balls", Annu. Rev. Fluid Mech. 17 (1985) 151 (panelled balls near their crisis)', confirmed: false, note: 'from memory; broad on purpose' },
    crisisReynolds: [1.5e5, 3.5e5],
  },
  rugby: {
    id: 'rugby', name: 'Rugby union ball', sport: 'rugby union', shape: 'prolate spheroid',
    massKg: { min: 0.41, max: 0.46, nominal: 0.435 },
    // Reference area: the widest section, from the width circumference of Law 2 (0.58–0.62 m, from memory).
    diameterM: { min: 0.58 / Math.PI, max: 0.62 / Math.PI, nominal: 0.6 / Math.PI },
    sizeRule: { quantity: 'length', min: 0.28, max: 0.3 },
    rule: { source: 'World Rugby Laws of the Game, Law 2 (The ball)', confirmed: false, note: 'length 280–300 mm from the project references; width circumference 580–620 mm from memory' },
    cd: { min: 0.1, max: 0.6, nominal: 0.25, source: 'Seo, Kobayashi & Murakami, "Flight characteristics of rugby ball", Sports Engineering (2004-2006)', confirmed: false, note: 'from memory; orientation changes it several-fold (end-on spiral low, tumbling high): a fitted C_d is an average over the flight' },
  },
  golf: {
    id: 'golf', name: 'Golf ball', sport: 'golf', shape: 'sphere',
    massKg: { min: 0.0450, max: 0.04593, nominal: 0.0459 },
    diameterM: { min: 0.04267, max: 0.0432, nominal: 0.04267 },
    sizeRule: { quantity: 'diameter', min: 0.04267, max: 0.0432 },
    rule: { source: 'Rules of Golf, Equipment Rules (Part 4: the ball)', confirmed: false, note: 'the rule sets a maximum mass of 45.93 g and a minimum diameter of 42.67 mm only; the other ends are typical balls, from memory' },
    cd: { min: 0.2, max: 0.3, nominal: 0.25, source: 'Bearman & Harvey, "Golf ball aerodynamics", Aeronautical Quarterly 27 (1976) 112', confirmed: false, note: 'from memory; dimples bring the crisis down to a few 10⁴' },
    crisisReynolds: [3e4, 9e4],
  },
  'shot-men': {
    id: 'shot-men', name: "Shot, men's senior", sport: 'athletics (shot put)', shape: 'sphere',
    massKg: { min: 7.26, max: 7.285, nominal: 7.26 },
    diameterM: { min: 0.11, max: 0.13, nominal: 0.12 },
    sizeRule: { quantity: 'diameter', min: 0.11, max: 0.13 },
    rule: { source: 'World Athletics Competition Rules (shot)', confirmed: false, note: '7.260 kg is the minimum for competition; the upper end is the manufacturing range, from memory' },
    cd: { min: 0.4, max: 0.5, nominal: 0.47, source: 'Hoerner, Fluid-Dynamic Drag (1965): smooth sphere, subcritical', confirmed: false, note: 'from memory; air moves a shot by centimetres only, so C_d is rarely identifiable' },
    caution: 'Heavy implement: keep the landing sector clear and follow the governing body’s safety rules and the coach’s local practice.',
  },
  'shot-women': {
    id: 'shot-women', name: "Shot, women's senior", sport: 'athletics (shot put)', shape: 'sphere',
    massKg: { min: 4.0, max: 4.025, nominal: 4.0 },
    diameterM: { min: 0.095, max: 0.11, nominal: 0.1 },
    sizeRule: { quantity: 'diameter', min: 0.095, max: 0.11 },
    rule: { source: 'World Athletics Competition Rules (shot)', confirmed: false, note: '4.000 kg is the minimum for competition; the upper end is the manufacturing range, from memory' },
    cd: { min: 0.4, max: 0.5, nominal: 0.47, source: 'Hoerner, Fluid-Dynamic Drag (1965): smooth sphere, subcritical', confirmed: false, note: 'from memory' },
    caution: 'Heavy implement: keep the landing sector clear and follow the governing body’s safety rules and the coach’s local practice.',
  },
  'table-tennis': {
    id: 'table-tennis', name: 'Table tennis ball', sport: 'table tennis', shape: 'sphere',
    massKg: { min: 0.0026, max: 0.0028, nominal: 0.0027 },
    diameterM: { min: 0.0398, max: 0.0402, nominal: 0.04 },
    sizeRule: { quantity: 'diameter', min: 0.0398, max: 0.0402 },
    rule: { source: 'ITTF Handbook, Laws of Table Tennis 2.3 (The ball)', confirmed: false, note: 'from memory: 40 mm, 2.7 g; tolerances from the equipment regulations, from memory' },
    cd: { min: 0.4, max: 0.55, nominal: 0.47, source: 'Hoerner, Fluid-Dynamic Drag (1965): smooth sphere, subcritical', confirmed: false, note: 'from memory' },
  },
} satisfies Record<string, BallSpec>);

/** Ids of the catalogue, in catalogue order. */
export const BALL_IDS: readonly string[] = Object.freeze(Object.keys(BALLS));

/**
 * The physics properties of a catalogue ball at its nominal mass and size.
 * @throws PhysicsError `UNKNOWN_BALL` naming the known ids.
 */
export function ballProps(id: string): BallProps {
  const spec = BALLS[id];
  if (!spec) {
    throw new PhysicsError('UNKNOWN_BALL', `Unknown ball "${id}". Known balls: ${BALL_IDS.join(', ')}; or give the mass and diameter.`);
  }
  return {
    massKg: spec.massKg.nominal,
    diameterM: spec.diameterM.nominal,
    cdRange: { min: spec.cd.min, max: spec.cd.max },
    crisisReynolds: spec.crisisReynolds,
    name: spec.name,
  };
}

/**
 * Check a ball's mass and diameter and return it; accepts a catalogue id as well.
 * @throws PhysicsError `BAD_BALL` when mass or diameter is not a positive finite number in a plausible range.
 */
export function resolveBall(ball: BallProps | string): BallProps {
  const props = typeof ball === 'string' ? ballProps(ball) : ball;
  if (!Number.isFinite(props.massKg) || props.massKg <= 0 || props.massKg > 20) {
    throw new PhysicsError('BAD_BALL', `Ball mass ${props.massKg} kg is not a mass between 0 and 20 kg: give it in kilograms (a 430 g ball is 0.43).`);
  }
  if (!Number.isFinite(props.diameterM) || props.diameterM <= 0 || props.diameterM > 1) {
    throw new PhysicsError('BAD_BALL', `Ball diameter ${props.diameterM} m is not a diameter between 0 and 1 m: give it in metres (a 22 cm ball is 0.22).`);
  }
  if (props.cdRange && !(props.cdRange.min >= 0 && props.cdRange.max > props.cdRange.min)) {
    throw new PhysicsError('BAD_BALL', `The ball's C_d range ${props.cdRange.min}–${props.cdRange.max} is not a range of non-negative numbers.`);
  }
  return props;
}

/** Relative slack at the ends of a rulebook range, so that a value written at the limit (0.45 kg) still matches. */
const RANGE_SLACK = 1e-9;

function inRange(v: number, r: NominalRange): boolean {
  return v >= r.min * (1 - RANGE_SLACK) && v <= r.max * (1 + RANGE_SLACK);
}

/** Distance of a value from a range's nominal value, in half-widths of the range. */
function offNominal(v: number, r: NominalRange): number {
  const half = 0.5 * (r.max - r.min);
  return half > 0 ? Math.abs(v - r.nominal) / half : 0;
}

/**
 * The catalogue ball whose rulebook ranges hold both a mass and a diameter, for a ball given by its
 * mass and size alone; where two balls' ranges overlap (a rugby ball's widest section and a size 3
 * handball), the one whose nominal values lie nearer, counted in half-widths of each range.
 * @param massKg mass m (kg); @param diameterM diameter D (m) of the reference area.
 * @returns the ball, or null when no catalogue ball's ranges hold both.
 */
export function recogniseBall(massKg: number, diameterM: number): BallSpec | null {
  let best: BallSpec | null = null, bestOff = Infinity;
  for (const id of BALL_IDS) {
    const spec = BALLS[id];
    if (!inRange(massKg, spec.massKg) || !inRange(diameterM, spec.diameterM)) continue;
    const off = Math.hypot(offNominal(massKg, spec.massKg), offNominal(diameterM, spec.diameterM));
    if (off < bestOff) { best = spec; bestOff = off; }
  }
  return best;
}

/** Cross-section area A = πD²/4 (m²) of a ball of diameter D (m). */
export function crossSectionArea(diameterM: number): number {
  return (Math.PI * diameterM * diameterM) / 4;
}
