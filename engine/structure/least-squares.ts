/**
 * Ordinary linear least squares for the small design matrices of the structure detectors
 * (2 to about 10 columns): minimise Σ (y_i − Σ_j A_ij·β_j)².
 *
 * Solved through the normal equations AᵀA·β = Aᵀy by Gauss–Jordan elimination with
 * partial pivoting, which also gives (AᵀA)⁻¹, the unscaled covariance of β: with
 * independent errors of standard deviation σ, Cov(β) = σ²·(AᵀA)⁻¹ (Draper & Smith,
 * Applied Regression Analysis, 3rd ed., 1998, ch. 5). Callers centre their abscissae so
 * the normal equations stay well conditioned. Cost O(n·p² + p³).
 */
export interface LeastSquaresFit {
  coefficients: number[];
  /** Residual sum of squares, in squared units of y. */
  rss: number;
  /** (AᵀA)⁻¹: multiply by σ² for the covariance of the coefficients. */
  unscaledCovariance: number[][];
}

/** Fits y ≈ A·β; returns null when AᵀA is singular (too few or collinear points). */
export function leastSquares(rows: readonly (readonly number[])[], y: readonly number[]): LeastSquaresFit | null {
  const n = rows.length;
  if (n === 0) return null;
  const p = rows[0].length;
  if (n < p) return null;
  // Augmented matrix [AᵀA | Aᵀy | I].
  const m: number[][] = [];
  for (let j = 0; j < p; j++) {
    const row = new Array<number>(2 * p + 1).fill(0);
    for (let k = 0; k < p; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += rows[i][j] * rows[i][k];
      row[k] = s;
    }
    let sy = 0;
    for (let i = 0; i < n; i++) sy += rows[i][j] * y[i];
    row[p] = sy;
    row[p + 1 + j] = 1;
    m.push(row);
  }
  const scale = Math.max(...m.map((r, j) => Math.abs(r[j])), 1e-300);
  for (let col = 0; col < p; col++) {
    let pivot = col;
    for (let r = col + 1; r < p; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
    // A relative pivot this small means the columns are (numerically) dependent.
    if (Math.abs(m[pivot][col]) <= 1e-12 * scale) return null;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    const d = m[col][col];
    for (let k = 0; k < 2 * p + 1; k++) m[col][k] /= d;
    for (let r = 0; r < p; r++) {
      if (r === col) continue;
      const f = m[r][col];
      if (f === 0) continue;
      for (let k = 0; k < 2 * p + 1; k++) m[r][k] -= f * m[col][k];
    }
  }
  const coefficients = m.map((r) => r[p]);
  const unscaledCovariance = m.map((r) => r.slice(p + 1));
  let rss = 0;
  for (let i = 0; i < n; i++) {
    let fitted = 0;
    for (let j = 0; j < p; j++) fitted += rows[i][j] * coefficients[j];
    rss += (y[i] - fitted) ** 2;
  }
  return { coefficients, rss, unscaledCovariance };
}

/** Variance factor aᵀ·C·a of a linear combination a of the coefficients (multiply by σ²). */
export function combinationVariance(unscaledCovariance: readonly (readonly number[])[], a: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    if (a[i] === 0) continue;
    for (let j = 0; j < a.length; j++) s += a[i] * unscaledCovariance[i][j] * a[j];
  }
  return s;
}
