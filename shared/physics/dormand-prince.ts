/**
 * The Dormand–Prince 5(4) method's coefficients and the step-size controller's constants, shared
 * by the generic integrator (`integrate` in `integrator.ts`) and the planner's scalar flight
 * kernel (`kernel.ts`), so that both take exactly the same steps, and the root finder both use to
 * locate events on a step's dense output.
 *
 * Tableau: Dormand & Prince, "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6
 * (1980) 19–26; Hairer, Nørsett & Wanner, *Solving Ordinary Differential Equations I* (2nd ed.
 * 1993), Table II.5.2. Continuous extension of order 4: Shampine (1986), as in DOPRI5's CONTD5.
 * Step control: HNW I §II.4 and the DOPRI5 code's defaults.
 */
export const DORMAND_PRINCE = {
  // Stage times c_i (the flight's right-hand side does not depend on time; the generic one may).
  C2: 1 / 5, C3: 3 / 10, C4: 4 / 5, C5: 8 / 9,
  // Stage weights a_ij; the seventh row is the fifth-order solution b_j (first same as last).
  A21: 1 / 5,
  A31: 3 / 40, A32: 9 / 40,
  A41: 44 / 45, A42: -56 / 15, A43: 32 / 9,
  A51: 19372 / 6561, A52: -25360 / 2187, A53: 64448 / 6561, A54: -212 / 729,
  A61: 9017 / 3168, A62: -355 / 33, A63: 46732 / 5247, A64: 49 / 176, A65: -5103 / 18656,
  A71: 35 / 384, A73: 500 / 1113, A74: 125 / 192, A75: -2187 / 6784, A76: 11 / 84,
  // Error estimate weights e_j = b_j − b̂_j.
  E1: 71 / 57600, E3: -71 / 16695, E4: 71 / 1920, E5: -17253 / 339200, E6: 22 / 525, E7: -1 / 40,
  // Dense output weights d_j of the continuous extension.
  D1: -12715105075 / 11282082432, D3: 87487479700 / 32700410799, D4: -10690763975 / 1880347072,
  D5: 701980252875 / 199316789632, D6: -1453857185 / 822651844, D7: 69997945 / 29380423,
} as const;

/** Step-size controller of DOPRI5 (HNW I §II.4): safety factor, shrink/grow limits and PI stabilisation. */
export const STEP_CONTROL = {
  SAFE: 0.9,
  /** The step shrinks at most ×5 ... */
  FAC_MIN: 0.2,
  /** ... and grows at most ×10 per step. */
  FAC_MAX: 10,
  /** PI stabilisation (Gustafsson); the DOPRI5 default. */
  BETA: 0.04,
  /** Exponent of the error in the step factor: 1/5 − 0.75·β. */
  EXPO1: 0.2 - 0.04 * 0.75,
} as const;

/**
 * Root of g on [ta, tb], where g(ta) and g(tb) differ in sign, by the Anderson–Björck variant of
 * regula falsi (Anderson & Björck, BIT 12 (1972) 503), to a few ulps of t; used on the dense output
 * of one step, so g is a cheap polynomial.
 * @param g the function of t (same unit as ta, tb); @param ga g(ta); @param gb g(tb).
 * @returns t of the zero; tb when gb is exactly 0.
 */
export function andersonBjorck(g: (t: number) => number, ta: number, tb: number, ga: number, gb: number): number {
  if (gb === 0) return tb;
  // b is always the newest point; a keeps the opposite sign.
  let a = ta, b = tb, fa = ga, fb = gb;
  const tolT = 8 * 2.3e-16 * Math.max(Math.abs(ta), Math.abs(tb), 1e-300);
  for (let it = 0; it < 200 && Math.abs(b - a) > tolT; it++) {
    let c = (a * fb - b * fa) / (fb - fa);
    const lo = Math.min(a, b), hi = Math.max(a, b);
    if (!(c > lo && c < hi)) c = 0.5 * (a + b);
    const fc = g(c);
    if (fc === 0) return c;
    if ((fc > 0) !== (fb > 0)) {
      a = b; fa = fb;
    } else {
      const m = 1 - fc / fb;
      fa *= m > 0 ? m : 0.5;
    }
    b = c; fb = fc;
  }
  return Math.abs(fa) < Math.abs(fb) ? a : b;
}
