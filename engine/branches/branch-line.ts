/**
 * Straight branches of a time–distance curve, t_ms = interceptMs + 1000·offset/velocity
 * (Kearey, Brooks & Hill 2002, ch. 5), and the crossover distance between two of them.
 */
import type { BranchLine } from '../output/interpretation.js';
import type { SidePick } from './side-picks.js';
import type { SegmentLine } from './segmented-fit.js';

/** BranchLine from a fitted segment; x extent from all its picks (outliers included). */
export function branchLineFromSegment(seg: SegmentLine, picks: SidePick[]): BranchLine {
  const xs = picks.slice(seg.start, seg.end).map((p) => p.x);
  return {
    velocity: 1000 / seg.slownessMsPerM,
    interceptMs: seg.interceptMs,
    fromX: Math.min(...xs),
    toX: Math.max(...xs),
    count: seg.count,
    rmsMs: seg.rmsMs,
  };
}

/** Time on a branch line at an offset, ms. */
export function timeOnBranchMs(line: BranchLine, offsetM: number): number {
  return line.interceptMs + (1000 * offsetM) / line.velocity;
}

/**
 * Offset where the refracted line overtakes the direct line, m:
 * x_c = (t_i,refr − t_i,dir) / (1000/V_dir − 1000/V_refr). Null when either is missing,
 * the refracted line is not faster, or the lines cross behind the shot.
 */
export function crossoverDistanceM(direct: BranchLine | null, refracted: BranchLine | undefined): number | null {
  if (!direct || !refracted) return null;
  const dSlowness = 1000 / direct.velocity - 1000 / refracted.velocity;
  if (!(dSlowness > 0)) return null;
  const x = (refracted.interceptMs - direct.interceptMs) / dSlowness;
  return Number.isFinite(x) && x >= 0 ? x : null;
}
