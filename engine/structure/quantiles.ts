/**
 * Quantiles of the normal and chi-square distributions for the detectors' thresholds.
 *
 * Normal quantile: Acklam's rational approximation (P. J. Acklam, "An algorithm for
 * computing the inverse normal cumulative distribution function", 2003), relative error
 * below 1.2e-9, which is far finer than any threshold here needs.
 * Chi-square quantile: Wilson & Hilferty (1931, Proc. Natl. Acad. Sci. 17) cube-root
 * approximation χ²_p(k) ≈ k·(1 − 2/(9k) + z_p·√(2/(9k)))³, within about 1 % for k ≥ 2 at
 * the 95–99.9 % levels used here; for k = 1 the exact value z_{(1+p)/2}² is returned.
 */

const A = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
const B = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
const C = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
const D = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];

/** z such that P(Z ≤ z) = p for a standard normal Z; p in (0, 1). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`normalQuantile: p must lie in (0, 1), got ${p}`);
  const pLow = 0.02425;
  if (p < pLow) {
    const q = Math.sqrt(-2 * Math.log(p));
    return (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5]) / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1);
  }
  if (p > 1 - pLow) return -normalQuantile(1 - p);
  const q = p - 0.5;
  const r = q * q;
  return ((((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q) / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1);
}

/** x such that P(χ²_k ≤ x) = p. */
export function chiSquareQuantile(p: number, degreesOfFreedom: number): number {
  if (!(degreesOfFreedom >= 1)) throw new RangeError(`chiSquareQuantile: degrees of freedom must be ≥ 1, got ${degreesOfFreedom}`);
  if (degreesOfFreedom === 1) return normalQuantile((1 + p) / 2) ** 2;
  const k = degreesOfFreedom;
  const z = normalQuantile(p);
  const c = 2 / (9 * k);
  return k * (1 - c + z * Math.sqrt(c)) ** 3;
}
