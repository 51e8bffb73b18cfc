/**
 * Which XY distances the generalised reciprocal method tries, and which it takes
 * (Palmer, "The generalized reciprocal method of seismic refraction interpretation", SEG,
 * 1980; Palmer, Geophysics 46, 1981).
 *
 * The range: XY = 0, d, 2d, … (d the geophone spacing) up to twice the largest expected
 * optimum, XY = 2·z·tan(ic) (Palmer 1980, for a planar refractor under a uniform layer),
 * with z and ic from the plus-minus result, and at least 4d so a shallow line still shows
 * a trend either side of its optimum; never more than a quarter of the spread (our choice:
 * beyond that each XY loses a quarter of its stations at the ends and the functions
 * compare unlike stretches of line).
 *
 * The optimum: Palmer (1980) takes the XY at which the velocity-analysis function is
 * simplest (closest to straight: the forward and reverse rays leave the refractor at the
 * same point, so the refractor's relief cancels out of t_V) and the one at which the
 * time-depth function shows most detail, and finds they usually agree. The computable
 * criterion here is the first: the least RMS residual of t_V about each pair's straight
 * line (xy-functions.ts, rmsAboutLines); ties go to the smaller XY (our choice: less
 * smoothing). The time-depth detail (RMS second difference of t_G) is reported beside it
 * for the geophysicist to judge. A first version took the RMS second difference of t_V: on
 * noise-free lines it found the same optimum, but second differences amplify pick noise and
 * damp the smooth relief, and with 0.1 ms of noise it chose anywhere from 2 to 12 m on a
 * line whose optimum is 8.7 m; the residual about a line chose 8 m on every seed
 * (tests/reference/grm.test.ts).
 */

/** Most XY steps tried: the quarter-spread rule in intervals, but never fewer than 0. */
export function xyStepRange(geophoneCount: number, spacingM: number, expectedOptimumM: number | null): number {
  const quarter = Math.floor((geophoneCount - 1) / 4);
  const wanted = Math.max(4, expectedOptimumM !== null && spacingM > 0 ? Math.ceil((2 * expectedOptimumM) / spacingM) : 4);
  return Math.max(0, Math.min(quarter, wanted));
}

/**
 * Palmer's expectation for a planar refractor, XY = 2·z·tan(ic), m, from a delay time
 * (ms) and V1 < V2 (m/s): z = δ·V1·V2/√(V2² − V1²) and tan ic = V1/√(V2² − V1²), so
 * XY = 2·δ·V1²·V2/(V2² − V1²) with δ in s. Null unless V2 > V1 > 0 and δ ≥ 0.
 */
export function expectedOptimumXyM(delayTimeMs: number, v1MPerS: number, v2MPerS: number): number | null {
  if (!(v1MPerS > 0) || !(v2MPerS > v1MPerS) || !Number.isFinite(v2MPerS) || !(delayTimeMs >= 0)) return null;
  return (2 * (delayTimeMs / 1000) * v1MPerS * v1MPerS * v2MPerS) / (v2MPerS * v2MPerS - v1MPerS * v1MPerS);
}

/** Index of the optimum among candidates (least roughness; ties and nulls to the smaller XY); 0 when none can be measured. */
export function optimumIndex(roughnessMs: readonly (number | null)[]): number {
  let best = 0;
  let bestValue = Number.POSITIVE_INFINITY;
  for (let k = 0; k < roughnessMs.length; k++) {
    const r = roughnessMs[k];
    // Strictly less beyond a relative 1e-9 so rounding noise does not pick a larger XY.
    if (r !== null && r < bestValue - 1e-9 * Math.max(1, Math.abs(bestValue === Number.POSITIVE_INFINITY ? 0 : bestValue))) {
      best = k;
      bestValue = r;
    }
  }
  return best;
}
