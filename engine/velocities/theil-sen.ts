/**
 * Theil–Sen slope: the median of the slopes of all pairs of points with distinct x
 * (Theil, Proc. KNAW 53, 1950; Sen, JASA 63, 1968). Up to about 29 % of the points can be
 * wild without moving it, which makes one bad pick harmless. Cost O(n²) pairs.
 */
import { median } from 'simple-statistics';

/** Median pairwise slope dy/dx; null when fewer than two distinct x. */
export function theilSenSlope(xs: number[], ys: number[]): number | null {
  const slopes: number[] = [];
  for (let i = 0; i < xs.length; i++) {
    for (let j = i + 1; j < xs.length; j++) {
      const dx = xs[j] - xs[i];
      if (Math.abs(dx) > 1e-9) slopes.push((ys[j] - ys[i]) / dx);
    }
  }
  return slopes.length ? median(slopes) : null;
}
