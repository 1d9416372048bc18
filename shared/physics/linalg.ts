/**
 * Dense linear algebra for the few-by-few systems of the fitter (p ≤ 8): Cholesky factorisation,
 * solve and inverse (Golub & Van Loan, *Matrix Computations*, 4th ed. 2013, §4.2). Matrices are
 * row-major Float64Arrays. Note: sized for tiny systems, where a general library's object
 * overhead costs more than the arithmetic.
 */

/**
 * In-place Cholesky factorisation A = L Lᵀ of a symmetric n×n matrix (lower triangle used and
 * overwritten by L). @returns false when A is not numerically positive definite.
 */
export function cholesky(a: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= a[j * n + k] * a[j * n + k];
    if (!(d > 0) || !Number.isFinite(d)) return false;
    const ljj = Math.sqrt(d);
    a[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= a[i * n + k] * a[j * n + k];
      a[i * n + j] = s / ljj;
    }
  }
  return true;
}

/** Solve L Lᵀ x = b in place (b becomes x), with L from {@link cholesky}. */
export function choleskySolve(l: Float64Array, n: number, b: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i * n + k] * b[k];
    b[i] = s / l[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < n; k++) s -= l[k * n + i] * b[k];
    b[i] = s / l[i * n + i];
  }
}

/**
 * Inverse of a symmetric positive-definite matrix.
 * @returns the inverse (new array), or null when the matrix is not positive definite.
 */
export function spdInverse(a: Float64Array, n: number): Float64Array | null {
  // Equilibrate first: covariance matrices mix units (m, m/s, dimensionless) over many decades.
  const s = new Float64Array(n);
  for (let i = 0; i < n; i++) s[i] = a[i * n + i] > 0 ? 1 / Math.sqrt(a[i * n + i]) : 1;
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) l[i * n + j] = a[i * n + j] * s[i] * s[j];
  if (!cholesky(l, n)) return null;
  const inv = new Float64Array(n * n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    col.fill(0);
    col[j] = 1;
    choleskySolve(l, n, col);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i] * s[i] * s[j];
  }
  return inv;
}

/** Least-squares polynomial coefficients c₀…c_d of y ≈ Σ c_k t^k with weights w (normal equations on t scaled to [0, 1]). */
export function polyFit(t: ArrayLike<number>, y: ArrayLike<number>, w: ArrayLike<number>, degree: number): Float64Array | null {
  const n = t.length;
  const m = degree + 1;
  const span = Math.max(Math.abs(t[n - 1] - t[0]), 1e-300);
  const t0 = t[0];
  const ata = new Float64Array(m * m);
  const atb = new Float64Array(m);
  const row = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    const s = (t[i] - t0) / span;
    row[0] = 1;
    for (let k = 1; k < m; k++) row[k] = row[k - 1] * s;
    for (let a = 0; a < m; a++) {
      atb[a] += w[i] * row[a] * y[i];
      for (let b = 0; b <= a; b++) ata[a * m + b] += w[i] * row[a] * row[b];
    }
  }
  for (let a = 0; a < m; a++) for (let b = a + 1; b < m; b++) ata[a * m + b] = ata[b * m + a];
  if (!cholesky(ata, m)) return null;
  choleskySolve(ata, m, atb);
  // Back to unscaled time measured from t0.
  for (let k = 1; k < m; k++) atb[k] /= Math.pow(span, k);
  return atb;
}
