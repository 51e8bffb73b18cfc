/**
 * Consistency along the spread: a first-break curve is piecewise nearly straight along the
 * geophones (one slope per refractor branch, a V at the shot), so a pick far from what its
 * neighbours predict is an outlier (a cycle skip or a noise burst; common practice in
 * automatic picking, our formulation). Each pick is predicted by straight-line
 * extrapolation from the two nearest picks on its left and, separately, the two on its
 * right; its residual is the smaller of the two misfits, so a genuine change of slope (the
 * crossover, the shot point) is fitted from one side. The worst pick above the threshold is
 * rejected and the residuals recomputed, until none is above: O(n²) at worst for n traces.
 */

/** Residual of each pick against its neighbours' trend, ms; null where no side has two picks. O(n). */
export function trendResiduals(x: readonly number[], t: readonly (number | null)[]): (number | null)[] {
  const picked: number[] = [];
  t.forEach((v, i) => {
    if (v !== null) picked.push(i);
  });
  const out: (number | null)[] = t.map(() => null);
  picked.forEach((i, p) => {
    const sides: number[] = [];
    if (p >= 2) sides.push(extrapolate(x, t, picked[p - 1], picked[p - 2], i));
    if (p + 2 < picked.length) sides.push(extrapolate(x, t, picked[p + 1], picked[p + 2], i));
    if (sides.length > 0) out[i] = Math.min(...sides.map((pred) => Math.abs((t[i] as number) - pred)));
  });
  return out;
}

function extrapolate(x: readonly number[], t: readonly (number | null)[], near: number, far: number, at: number): number {
  const t1 = t[near] as number;
  const t2 = t[far] as number;
  const dx = x[near] - x[far];
  const slope = dx === 0 ? 0 : (t1 - t2) / dx;
  return t1 + slope * (x[at] - x[near]);
}

/**
 * The picks with outliers set to null, and the indices rejected (in the order rejected).
 * `thresholdMs` is the largest residual kept.
 */
export function rejectOutliers(x: readonly number[], times: readonly (number | null)[], thresholdMs: number): { times: (number | null)[]; rejected: number[] } {
  const t = times.slice();
  const rejected: number[] = [];
  for (;;) {
    const residuals = trendResiduals(x, t);
    let worst = -1;
    let worstResidual = thresholdMs;
    residuals.forEach((r, i) => {
      if (r !== null && r > worstResidual) {
        worstResidual = r;
        worst = i;
      }
    });
    if (worst < 0) return { times: t, rejected };
    t[worst] = null;
    rejected.push(worst);
  }
}
