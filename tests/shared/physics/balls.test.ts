import { describe, expect, it } from 'vitest';
import { BALLS, BALL_IDS, ballProps, isPhysicsError, recogniseBall, resolveBall } from '../../../shared/physics/index';

// Rulebook ranges as listed in the project's REFERENCES.md (from memory where not confirmed there);
// tolerance 0.5 % on masses and sizes.
const RULEBOOK: Record<string, { mass: [number, number]; size: [number, number]; quantity: string; source: string }> = {
  'football-5': { mass: [0.41, 0.45], size: [0.68, 0.7], quantity: 'circumference', source: 'IFAB Laws of the Game, Law 2' },
  tennis: { mass: [0.056, 0.0594], size: [0.0654, 0.0686], quantity: 'diameter', source: 'ITF Rules of Tennis, Appendix I' },
  volleyball: { mass: [0.26, 0.28], size: [0.65, 0.67], quantity: 'circumference', source: 'FIVB Official Volleyball Rules, rule 3' },
  'basketball-7': { mass: [0.567, 0.65], size: [0.749, 0.78], quantity: 'circumference', source: 'FIBA Official Basketball Rules' },
  baseball: { mass: [0.1417, 0.1488], size: [0.2286, 0.235], quantity: 'circumference', source: 'Official Baseball Rules 3.01' },
  'cricket-men': { mass: [0.1559, 0.163], size: [0.224, 0.229], quantity: 'circumference', source: 'MCC Laws of Cricket, Law 4' },
  'handball-3': { mass: [0.425, 0.475], size: [0.58, 0.6], quantity: 'circumference', source: 'IHF Rules of the Game, rule 3' },
  rugby: { mass: [0.41, 0.46], size: [0.28, 0.3], quantity: 'length', source: 'World Rugby Laws, Law 2' },
};

describe('BALLS', () => {
  it.each(Object.entries(RULEBOOK))('matches the rulebook ranges for %s', (id, rule) => {
    const b = BALLS[id];
    expect(b.massKg.min).toBeCloseTo(rule.mass[0], 3);
    expect(Math.abs(b.massKg.max / rule.mass[1] - 1)).toBeLessThan(5e-3);
    expect(b.sizeRule.quantity).toBe(rule.quantity);
    expect(Math.abs(b.sizeRule.min / rule.size[0] - 1)).toBeLessThan(5e-3);
    expect(Math.abs(b.sizeRule.max / rule.size[1] - 1)).toBeLessThan(5e-3);
    expect(b.rule.source).toContain(rule.source.split(',')[0].split(' ')[0]);
  });

  it('keeps the golf ball within the Rules of Golf limits (≤ 45.93 g, ≥ 42.67 mm)', () => {
    // Rules of Golf, equipment rules (from memory).
    expect(BALLS.golf.massKg.max).toBeLessThanOrEqual(0.04593);
    expect(BALLS.golf.diameterM.min).toBeGreaterThanOrEqual(0.04267);
  });

  it('sets the shot masses at 7.260 kg and 4.000 kg', () => {
    // World Athletics Competition Rules (from memory).
    expect(BALLS['shot-men'].massKg.nominal).toBe(7.26);
    expect(BALLS['shot-women'].massKg.nominal).toBe(4);
  });

  it.each(BALL_IDS)('keeps nominal values inside the ranges and a diameter that matches the size rule for %s', (id) => {
    const b = BALLS[id];
    for (const r of [b.massKg, b.diameterM, b.cd]) {
      expect(r.nominal).toBeGreaterThanOrEqual(r.min);
      expect(r.nominal).toBeLessThanOrEqual(r.max);
    }
    if (b.sizeRule.quantity === 'circumference') expect(b.diameterM.min).toBeCloseTo(b.sizeRule.min / Math.PI, 10);
    if (b.sizeRule.quantity === 'diameter') expect(b.diameterM.min).toBe(b.sizeRule.min);
    expect(b.cd.source.length).toBeGreaterThan(10);
    expect(b.rule.confirmed === false ? b.rule.note : 'confirmed').toBeTruthy();
  });

  it('gives the published C_d values their ranges', () => {
    // Asai et al. (2007), Goff & Carré (2009): football 0.2–0.3; Mehta & Pallis (2001): tennis ≈ 0.55; Nathan (2008): baseball 0.3–0.5.
    expect([BALLS['football-5'].cd.min, BALLS['football-5'].cd.max]).toEqual([0.2, 0.3]);
    expect(BALLS.tennis.cd.nominal).toBe(0.55);
    expect([BALLS.baseball.cd.min, BALLS.baseball.cd.max]).toEqual([0.3, 0.5]);
  });
});

describe('ballProps and resolveBall', () => {
  it('returns nominal mass, diameter and the C_d range of a catalogue ball', () => {
    const p = ballProps('football-5');
    expect(p.massKg).toBe(0.43);
    expect(p.diameterM).toBeCloseTo(0.69 / Math.PI, 12);
    expect(p.cdRange).toEqual({ min: 0.2, max: 0.3 });
  });

  it('names the known balls when the id is unknown', () => {
    try {
      ballProps('beachball');
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('UNKNOWN_BALL');
      expect((e as Error).message).toContain('football-5');
    }
  });

  it('refuses a mass given in grams with a hint to use kilograms', () => {
    expect(() => resolveBall({ massKg: 430, diameterM: 0.22 })).toThrowError(/give it in kilograms/);
  });

  it('refuses a diameter given in centimetres with a hint to use metres', () => {
    expect(() => resolveBall({ massKg: 0.43, diameterM: 22 })).toThrowError(/give it in metres/);
  });
});

describe('recogniseBall', () => {
  it.each(BALL_IDS)('recognises %s at its nominal mass and diameter', (id) => {
    expect(recogniseBall(BALLS[id].massKg.nominal, BALLS[id].diameterM.nominal)?.id).toBe(id);
  });

  it('recognises a ball at the very ends of its rulebook ranges', () => {
    // IFAB Law 2 (from memory): 410–450 g, 68–70 cm circumference.
    expect(recogniseBall(0.41, 0.68 / Math.PI)?.id).toBe('football-5');
    expect(recogniseBall(0.45, 0.7 / Math.PI)?.id).toBe('football-5');
  });

  it('recognises nothing when the mass or the diameter lies outside every ball’s ranges', () => {
    expect(recogniseBall(0.3, 0.22)).toBeNull(); // a football's size, a volleyball's mass
    expect(recogniseBall(0.43, 0.3)).toBeNull();
    expect(recogniseBall(1, 0.15)).toBeNull();
  });

  it('takes the ball whose nominal values lie nearer where two balls’ ranges overlap', () => {
    // World Rugby Law 2's widest section and IHF rule 3's size 3 overlap near 0.44 kg and 0.19 m (both from memory).
    expect(recogniseBall(0.44, 0.194)?.id).toBe('rugby');
    expect(recogniseBall(0.46, 0.186)?.id).toBe('handball-3');
  });
});
