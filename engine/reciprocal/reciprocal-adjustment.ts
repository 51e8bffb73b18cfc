/**
 * Joint adjustment of the reciprocal times of opposing shot pairs (plus-minus method,
 * Hagedoorn, Geophysical Prospecting 7, 1959). Units: ms, ms².
 */
import type { NanNone } from '../shared/nan-none.js';
import { planStructuredAdjustment } from './structured-adjustment.js';
import { zeros, type Doubles } from '../shared/zeros.js';

/** What the adjustment reads and corrects of one opposing pair. */
export interface AdjustablePair {
  /** T+ per geophone, ms (NaN where the pair gives none: shared/nan-none.ts). */
  plusTimeMs: NanNone;
  /** Variance of T+ per geophone, ms², including the reciprocal time's variance; NaN where none. */
  plusVarianceMs2: NanNone;
  /** The pair's reciprocal time tAB, ms. */
  reciprocalTimeMs: number;
  /** Variance of tAB, ms². */
  reciprocalVarianceMs2: number;
}

/**
 * Adjusts the reciprocal times of all pairs together. A pair's reciprocal time tAB is one
 * constant for all its geophones, and the delay time at a geophone is the same whichever
 * pair measures it (Hagedoorn 1959), so where pairs overlap their T+ differ only by the
 * errors of their tAB. Each pair gets a correction s_p by weighted least squares over
 *   (T+_p,i − s_p) − (T+_q,i − s_q) = 0 at every shared geophone i (weight 1/(σ²_p,i + σ²_q,i), picks only),
 *   s_p = 0 (weight 1/var(tAB_p), the pair's own reading, so the level is set by the
 *   best-read reciprocal times: at a geophone or a short extrapolation),
 * the same constant shift that phantoming applies to an off-end branch, here found for all
 * pairs at once, as in a network adjustment. It replaces long extrapolations of curved
 * branches to off-end shots (errors of several ms) by the misfit of measured picks.
 * Only pairs whose reciprocal check passed (or could not be verified) take part: a pair
 * with a proven misfit stays a fallback. Mutates `pairWork` in place.
 *
 * Cost: the normal matrix N = Δ − U·Ω·Uᵀ (diagonal minus low rank: the pick variances at a
 * geophone take few distinct values) is solved through that structure when it is cheaper
 * (structured-adjustment.ts: O(R³ + Σ_p n_p²) for R class columns, a few per shot), else
 * densely (building N O(Σ_i k_i²), one Cholesky factorisation k³/6, the shifts O(k²) and
 * the diagonal of the inverse k³/6 from the same factor: O(k³), O(k²) memory). The choice
 * is made on the counted work; both give the same numbers to rounding.
 */
export function adjustReciprocalTimes(pairWork: AdjustablePair[]): void {
  const k = pairWork.length;
  if (k < 2) return;
  const result = reciprocalAdjustment(pairWork);
  if (!result) return;
  pairWork.forEach((p, m) => {
    const shift = result.shifts[m];
    const variance = result.inverseDiagonal[m];
    if (!Number.isFinite(shift) || !(variance > 0)) return;
    // In place (NaN stays NaN): the arrays belong to the pair. O(N) per pair.
    const times = p.plusTimeMs;
    const variances = p.plusVarianceMs2;
    const former = p.reciprocalVarianceMs2;
    for (let i = 0; i < times.length; i++) times[i] = times[i] - shift;
    for (let i = 0; i < variances.length; i++) variances[i] = variances[i] - former + variance;
    p.reciprocalTimeMs += shift;
    p.reciprocalVarianceMs2 = variance;
  });
}

/** Shifts and the diagonal of N⁻¹ by the cheaper of the two routes; null when no two pairs overlap. */
export function reciprocalAdjustment(pairWork: readonly AdjustablePair[]): { shifts: Doubles; inverseDiagonal: Doubles } | null {
  const k = pairWork.length;
  const plan = planStructuredAdjustment(pairWork);
  const structuredWork = plan.columns ** 3 / 2 + 2 * plan.pairColumnWork;
  const denseWork = k ** 3 / 3 + plan.denseBuildWork;
  if (structuredWork < denseWork) {
    const result = plan.solve();
    if (result === 'no-overlap') return null;
    if (result !== 'not-positive-definite') return result;
  }
  return denseReciprocalAdjustment(pairWork);
}

/** The dense route: normal equations, one Cholesky factor, the shifts and the inverse's diagonal from it. O(k³). */
export function denseReciprocalAdjustment(pairWork: readonly AdjustablePair[]): { shifts: Doubles; inverseDiagonal: Doubles } | null {
  const k = pairWork.length;
  const system = normalEquations(pairWork);
  if (!system) return null;
  const factor = choleskyFactor(system.matrix, k);
  if (!factor) return null;
  // Variance of each corrected tAB: the diagonal of the inverse normal matrix, from the same factor.
  return { shifts: choleskySolve(factor, k, system.rhs), inverseDiagonal: choleskyInverseDiagonal(factor, k) };
}

/**
 * The normal equations N·s = b of the adjustment above, N dense k×k row-major (every two
 * pairs that share a geophone are coupled), or null when no two pairs share a geophone.
 * Built geophone by geophone from the pairs with a pick there: O(k·G + Σ_i k_i²) for G
 * geophones and k_i pairs at geophone i (at most O(k²·G)), O(k²) memory.
 */
export function normalEquations(pairWork: readonly AdjustablePair[]): { matrix: Doubles; rhs: Doubles } | null {
  const k = pairWork.length;
  const matrix = zeros(k * k);
  const rhs = zeros(k);
  for (let m = 0; m < k; m++) matrix[m * k + m] += 1 / Math.max(pairWork[m].reciprocalVarianceMs2, 1e-6);
  const geophones = pairWork.reduce((g, p) => Math.max(g, p.plusTimeMs.length), 0);
  // Pairs with a usable T+ at the current geophone: index, T+, pick variance (reused).
  const at = zeros(k);
  const time = zeros(k);
  const variance = zeros(k);
  let overlaps = 0;
  for (let i = 0; i < geophones; i++) {
    let count = 0;
    for (let m = 0; m < k; m++) {
      const p = pairWork[m];
      const t = p.plusTimeMs[i];
      const v = p.plusVarianceMs2[i];
      if (t !== t || v !== v || t === undefined || v === undefined) continue; // NaN: none
      at[count] = m;
      time[count] = t;
      variance[count] = Math.max(v - p.reciprocalVarianceMs2, 1e-6);
      count++;
    }
    for (let a = 0; a < count; a++) {
      const m = at[a];
      for (let c = a + 1; c < count; c++) {
        const n = at[c];
        // residual r = (tp − s_m) − (tq − s_n); minimising w·r² adds to the normal equations.
        const w = 1 / (variance[a] + variance[c]);
        const d = time[a] - time[c];
        matrix[m * k + m] += w;
        matrix[n * k + n] += w;
        matrix[m * k + n] -= w;
        matrix[n * k + m] -= w;
        rhs[m] += w * d;
        rhs[n] -= w * d;
        overlaps++;
      }
    }
  }
  return overlaps === 0 ? null : { matrix, rhs };
}

/**
 * Cholesky factor L (lower triangle, row-major k×k) of a symmetric positive-definite
 * matrix, N = L·Lᵀ (Golub & Van Loan, Matrix Computations, 4th ed., 2013, §4.2); null when
 * a pivot is not above 1e-12 (the bound the former elimination used: numerically
 * singular). Cost k³/6 multiply-adds, O(k²) memory; reads only the lower triangle.
 */
export function choleskyFactor(matrix: Doubles, k: number): Doubles | null {
  const l = zeros(k * k);
  for (let j = 0; j < k; j++) {
    const rowJ = j * k;
    let d = matrix[rowJ + j];
    for (let c = 0; c < j; c++) d -= l[rowJ + c] * l[rowJ + c];
    if (!(d > 1e-12)) return null;
    const ljj = Math.sqrt(d);
    l[rowJ + j] = ljj;
    for (let r = j + 1; r < k; r++) {
      const rowR = r * k;
      let s = matrix[rowR + j];
      for (let c = 0; c < j; c++) s -= l[rowR + c] * l[rowJ + c];
      l[rowR + j] = s / ljj;
    }
  }
  return l;
}

/** Solves L·Lᵀ·x = b by forward and back substitution. Cost O(k²). */
export function choleskySolve(l: Doubles, k: number, rhs: Doubles): Doubles {
  const y = zeros(k);
  for (let r = 0; r < k; r++) {
    let s = rhs[r];
    for (let c = 0; c < r; c++) s -= l[r * k + c] * y[c];
    y[r] = s / l[r * k + r];
  }
  const x = zeros(k);
  for (let r = k - 1; r >= 0; r--) {
    let s = y[r];
    for (let c = r + 1; c < k; c++) s -= l[c * k + r] * x[c];
    x[r] = s / l[r * k + r];
  }
  return x;
}

/**
 * Diagonal of N⁻¹ from the Cholesky factor: N⁻¹ = L⁻ᵀ·L⁻¹, so (N⁻¹)_mm = Σ_j (L⁻¹)_jm²,
 * the squared norm of column m of L⁻¹ (Golub & Van Loan 2013, §3.1 for the triangular
 * inverse). L⁻¹ is built column by column by forward substitution into one reused
 * vector: k³/6 multiply-adds, O(k) extra memory; no k×k system is solved k times.
 */
export function choleskyInverseDiagonal(l: Doubles, k: number): Doubles {
  const diagonal = zeros(k);
  const column = zeros(k);
  for (let m = 0; m < k; m++) {
    // Column m of L⁻¹: zero above row m, 1/L_mm at m, then forward substitution.
    column[m] = 1 / l[m * k + m];
    let sum = column[m] * column[m];
    for (let r = m + 1; r < k; r++) {
      const row = r * k;
      let s = 0;
      for (let c = m; c < r; c++) s -= l[row + c] * column[c];
      column[r] = s / l[row + r];
      sum += column[r] * column[r];
    }
    diagonal[m] = sum;
  }
  return diagonal;
}
