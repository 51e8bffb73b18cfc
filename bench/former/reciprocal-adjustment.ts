// The former engine/reciprocal/reciprocal-adjustment.ts, kept only so that npm run bench can time it beside the current one in the same run.
/**
 * Joint adjustment of the reciprocal times of opposing shot pairs (plus-minus method,
 * Hagedoorn, Geophysical Prospecting 7, 1959). Units: ms, ms².
 */

/** What the adjustment reads and corrects of one opposing pair. */
export interface AdjustablePair {
  /** T+ per geophone, ms (null where the pair gives none). */
  plusTimeMs: (number | null)[];
  /** Variance of T+ per geophone, ms², including the reciprocal time's variance. */
  plusVarianceMs2: (number | null)[];
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
 */
export function adjustReciprocalTimes(pairWork: AdjustablePair[]): void {
  const k = pairWork.length;
  if (k < 2) return;
  const a: number[][] = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const b = new Array<number>(k).fill(0);
  const pickVariance = (p: AdjustablePair, i: number): number | null => {
    const v = p.plusVarianceMs2[i];
    return p.plusTimeMs[i] === null || v === null ? null : Math.max(v - p.reciprocalVarianceMs2, 1e-6);
  };
  pairWork.forEach((p, m) => (a[m][m] += 1 / Math.max(p.reciprocalVarianceMs2, 1e-6)));
  let overlaps = 0;
  for (let m = 0; m < k; m++) {
    for (let n = m + 1; n < k; n++) {
      const p = pairWork[m];
      const q = pairWork[n];
      p.plusTimeMs.forEach((tp, i) => {
        const tq = q.plusTimeMs[i];
        const vp = pickVariance(p, i);
        const vq = pickVariance(q, i);
        if (tp === null || tq === null || vp === null || vq === null) return;
        // residual r = (tp − s_m) − (tq − s_n); minimising w·r² adds to the normal equations.
        const w = 1 / (vp + vq);
        const d = tp - tq;
        a[m][m] += w;
        a[n][n] += w;
        a[m][n] -= w;
        a[n][m] -= w;
        b[m] += w * d;
        b[n] -= w * d;
        overlaps++;
      });
    }
  }
  if (overlaps === 0) return;
  const shifts = solveSymmetric(a, b);
  if (!shifts) return;
  // Variance of each corrected tAB: the diagonal of the inverse normal matrix.
  const inverseDiagonal = pairWork.map((_, m) => {
    const e = new Array<number>(k).fill(0);
    e[m] = 1;
    return solveSymmetric(a, e)?.[m] ?? null;
  });
  pairWork.forEach((p, m) => {
    const shift = shifts[m];
    const variance = inverseDiagonal[m];
    if (!Number.isFinite(shift) || variance === null || !(variance > 0)) return;
    p.plusTimeMs = p.plusTimeMs.map((v) => (v === null ? null : v - shift));
    p.reciprocalTimeMs += shift;
    p.plusVarianceMs2 = p.plusVarianceMs2.map((v) => (v === null ? null : v - p.reciprocalVarianceMs2 + variance));
    p.reciprocalVarianceMs2 = variance;
  });
}

/** Solves a small symmetric positive-definite system by Gaussian elimination with partial pivoting; null if singular. */
function solveSymmetric(matrix: number[][], rhs: number[]): number[] | null {
  const n = rhs.length;
  const m = matrix.map((row, i) => [...row, rhs[i]]);
  for (let c = 0; c < n; c++) {
    let pivot = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[pivot][c])) pivot = r;
    if (!(Math.abs(m[pivot][c]) > 1e-12)) return null;
    [m[c], m[pivot]] = [m[pivot], m[c]];
    for (let r = c + 1; r < n; r++) {
      const f = m[r][c] / m[c][c];
      for (let j = c; j <= n; j++) m[r][j] -= f * m[c][j];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let sum = m[r][n];
    for (let j = r + 1; j < n; j++) sum -= m[r][j] * x[j];
    x[r] = sum / m[r][r];
  }
  return x;
}
