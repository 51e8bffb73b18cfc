/**
 * Polylines along the line: a ground surface or an interface as (x, elevation) vertices,
 * x non-decreasing. Two vertices at the same x make a vertical step.
 * Evaluation is linear between vertices, constant beyond the ends, and right-continuous
 * at a step (at the step's x the value after the step applies).
 */
export interface ModelPoint {
  /** Distance along the line, m. */
  x: number;
  /** Elevation, m. */
  elevation: number;
}

/** Elevation of a polyline at x, m. The polyline must hold at least one vertex. */
export function elevationAt(points: readonly ModelPoint[], x: number): number {
  const n = points.length;
  if (x < points[0].x) return points[0].elevation;
  if (x >= points[n - 1].x) return points[n - 1].elevation;
  // Largest a with points[a].x <= x; then points[a + 1].x > x.
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (points[mid].x <= x) lo = mid;
    else hi = mid;
  }
  const a = points[lo];
  const b = points[hi];
  const f = (x - a.x) / (b.x - a.x);
  return a.elevation + f * (b.elevation - a.elevation);
}
