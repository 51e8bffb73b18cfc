/**
 * Robust estimate of the noise standard deviation of a profile that is piecewise linear
 * apart from noise (a T− or delay-time profile).
 *
 * Each interior point is compared with the straight line through its two neighbours:
 * r_i = y_i − [w·y_{i−1} + (1 − w)·y_{i+1}], w = (x_{i+1} − x_i)/(x_{i+1} − x_{i−1}).
 * With independent errors of standard deviation σ, Var(r_i) = σ²·(1 + w² + (1 − w)²)
 * (for even spacing 1.5·σ², the second-difference estimator of Rice, Ann. Stat. 12, 1984).
 * The residuals vanish on straight pieces, so the few near kinks or steps are outliers;
 * the median absolute deviation, scaled by 1/0.6745 for a normal distribution
 * (Hampel, J. Am. Stat. Assoc. 69, 1974), ignores them. Returns null with fewer than 5 points.
 */
export function robustNoiseSigma(x: readonly number[], y: readonly number[]): number | null {
  if (x.length < 5) return null;
  const scaled: number[] = [];
  for (let i = 1; i < x.length - 1; i++) {
    const w = (x[i + 1] - x[i]) / (x[i + 1] - x[i - 1]);
    const r = y[i] - (w * y[i - 1] + (1 - w) * y[i + 1]);
    scaled.push(Math.abs(r) / Math.sqrt(1 + w * w + (1 - w) * (1 - w)));
  }
  scaled.sort((a, b) => a - b);
  const mid = scaled.length >> 1;
  const median = scaled.length % 2 ? scaled[mid] : 0.5 * (scaled[mid - 1] + scaled[mid]);
  return median / 0.6745;
}
