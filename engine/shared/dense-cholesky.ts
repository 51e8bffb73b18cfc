/**
 * Cholesky factorisation of small dense symmetric matrices (row-major n×n) and the inverses
 * it gives (Golub & Van Loan, Matrix Computations, 4th ed., 2013, §4.2): the reduced systems
 * of the reciprocal-time adjustment and of the time-term inversion. O(n³/3) to factor,
 * O(n³) for an inverse.
 */
import { zeros, type Doubles } from './zeros.js';

/**
 * Lower Cholesky factor in place (the upper triangle zeroed); false when a pivot is not
 * above `minPivot` (not positive definite, or singular to the caller's tolerance).
 */
export function factorInPlace(a: Doubles, n: number, minPivot = 0): boolean {
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let c = 0; c < j; c++) d -= a[j * n + c] * a[j * n + c];
    if (!(d > minPivot)) return false;
    const ljj = Math.sqrt(d);
    a[j * n + j] = ljj;
    for (let r = j + 1; r < n; r++) {
      let s = a[r * n + j];
      for (let c = 0; c < j; c++) s -= a[r * n + c] * a[j * n + c];
      a[r * n + j] = s / ljj;
    }
    for (let c = j + 1; c < n; c++) a[j * n + c] = 0;
  }
  return true;
}

/** L⁻¹ of a lower-triangular L (row-major n×n), by forward substitution column by column. */
export function lowerInverse(l: Doubles, n: number): Doubles {
  const inv = zeros(n * n);
  for (let m = 0; m < n; m++) {
    inv[m * n + m] = 1 / l[m * n + m];
    for (let r = m + 1; r < n; r++) {
      let s = 0;
      for (let c = m; c < r; c++) s -= l[r * n + c] * inv[c * n + m];
      inv[r * n + m] = s / l[r * n + r];
    }
  }
  return inv;
}

/** (L·Lᵀ)⁻¹ = L⁻ᵀ·L⁻¹ from the factor L, symmetric, row-major. */
export function inverseFromFactor(l: Doubles, n: number): Doubles {
  const li = lowerInverse(l, n);
  const inv = zeros(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < n; k++) s += li[k * n + i] * li[k * n + j];
      inv[i * n + j] = s;
      inv[j * n + i] = s;
    }
  }
  return inv;
}
