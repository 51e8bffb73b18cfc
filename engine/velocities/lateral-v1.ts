/**
 * Top-layer velocity along the line from the direct-wave branches of every shot side.
 *
 * A direct branch t = x/V1 samples the top layer between its shot and its last direct pick,
 * so each shot side's velocity belongs at the middle of its direct picks. When the sides
 * agree within their pick noise, V1 is one number for the line (the median, as
 * velocities/direct-velocity.ts gives). When they do not, V1 varies along the line and each
 * geophone takes the value interpolated linearly in x between the nearest side midpoints
 * (the nearest one beyond the outermost), so depths use the velocity of the layer above
 * them (Kearey, Brooks & Hill 2002, ch. 5: depth = delay·V1/cos ic with the local V1).
 *
 * Agreement test: slownesses p_j = 1/V_j with standard errors SE_j = σ/√Sxx_j (least-squares
 * slope of t against offset, σ the larger of the pick uncertainty and the branch's RMS,
 * Sxx_j from its offsets); χ² = Σ (p_j − p̄)²/SE_j² against its AGREEMENT_LEVEL quantile with J − 1
 * degrees of freedom (Draper & Smith 1998, ch. 2), and the velocities must also differ by at
 * least MIN_LATERAL_V1_CHANGE (common practice: smaller lateral changes are not resolved).
 * Units: x in m, velocities in m/s, times in ms.
 */
import { chiSquareQuantile } from '../structure/quantiles.js';

/**
 * Level of the agreement test. Strict (99.9 %) because a lateral V1 read from noise moves
 * every depth near it; a real change of the top layer shows far beyond it.
 */
export const AGREEMENT_LEVEL = 0.999;

/** Smallest relative spread of the side velocities treated as a lateral change. Common practice. */
export const MIN_LATERAL_V1_CHANGE = 0.05;

export interface DirectSide {
  shot: string;
  side: 'left' | 'right';
  /** Direct-wave velocity of that side, m/s. */
  velocity: number;
  /** Middle of the direct picks along the line, m. */
  xM: number;
  /** Standard error of the slowness, ms per m. */
  slownessStandardErrorMsPerM: number;
}

export interface LocalTopLayerVelocity {
  /** V1 at each geophone, m/s; null when no direct branch was found. */
  v1MPerS: (number | null)[];
  /** True when the sides disagree beyond their noise and V1 varies along the line. */
  lateral: boolean;
  /** The sides used, with their positions. */
  sides: DirectSide[];
  /** χ² of the agreement test and its threshold (null with fewer than two sides). */
  chiSquare: number | null;
  threshold: number | null;
}

/** Standard error of a least-squares slowness from n picks spread over offsets, ms/m. */
export function slownessStandardError(offsetsM: number[], sigmaMs: number): number {
  const n = offsetsM.length;
  const mean = offsetsM.reduce((s, v) => s + v, 0) / Math.max(1, n);
  const sxx = offsetsM.reduce((s, v) => s + (v - mean) ** 2, 0);
  return sxx > 0 ? sigmaMs / Math.sqrt(sxx) : Infinity;
}

export function localTopLayerVelocities(geophoneXM: number[], sides: DirectSide[], lineV1MPerS: number | null): LocalTopLayerVelocity {
  const usable = sides.filter((s) => s.velocity > 0 && Number.isFinite(s.xM) && Number.isFinite(s.slownessStandardErrorMsPerM));
  const uniform = (chiSquare: number | null, threshold: number | null): LocalTopLayerVelocity => ({
    v1MPerS: geophoneXM.map(() => lineV1MPerS),
    lateral: false,
    sides: usable,
    chiSquare,
    threshold,
  });
  if (usable.length < 2 || lineV1MPerS === null) return uniform(null, null);
  const p = usable.map((s) => 1000 / s.velocity);
  const w = usable.map((s) => 1 / Math.max(s.slownessStandardErrorMsPerM, 1e-9) ** 2);
  const sw = w.reduce((a, b) => a + b, 0);
  const mean = p.reduce((a, pj, j) => a + w[j] * pj, 0) / sw;
  const chiSquare = p.reduce((a, pj, j) => a + w[j] * (pj - mean) ** 2, 0);
  const threshold = chiSquareQuantile(AGREEMENT_LEVEL, usable.length - 1);
  const vs = usable.map((s) => s.velocity);
  const spread = (Math.max(...vs) - Math.min(...vs)) / Math.min(...vs);
  if (!(chiSquare > threshold) || spread < MIN_LATERAL_V1_CHANGE) return uniform(chiSquare, threshold);

  // Knots: side midpoints in x; sides at the same place are averaged in slowness.
  const sorted = [...usable].sort((a, b) => a.xM - b.xM);
  const knots: { x: number; slowness: number; weight: number }[] = [];
  for (const s of sorted) {
    const weight = 1 / Math.max(s.slownessStandardErrorMsPerM, 1e-9) ** 2;
    const last = knots[knots.length - 1];
    if (last && Math.abs(last.x - s.xM) < 1e-6) {
      last.slowness = (last.slowness * last.weight + (1000 / s.velocity) * weight) / (last.weight + weight);
      last.weight += weight;
    } else knots.push({ x: s.xM, slowness: 1000 / s.velocity, weight });
  }
  const velocityAt = (x: number): number => {
    if (x <= knots[0].x) return 1000 / knots[0].slowness;
    const last = knots[knots.length - 1];
    if (x >= last.x) return 1000 / last.slowness;
    const j = knots.findIndex((k) => k.x > x);
    const a = knots[j - 1];
    const b = knots[j];
    const f = (x - a.x) / (b.x - a.x);
    const va = 1000 / a.slowness;
    const vb = 1000 / b.slowness;
    return va + f * (vb - va);
  };
  return { v1MPerS: geophoneXM.map(velocityAt), lateral: true, sides: usable, chiSquare, threshold };
}
