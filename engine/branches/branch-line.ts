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
    velocity: velocityOfSlowness(seg.slownessMsPerM),
    interceptMs: seg.interceptMs,
    fromX: Math.min(...xs),
    toX: Math.max(...xs),
    count: seg.count,
    rmsMs: seg.rmsMs,
  };
}

/**
 * Apparent velocity of a fitted slowness, m/s; null for a level branch (slowness 0: picks of
 * one time, e.g. quantised to the same sample), whose apparent velocity is unbounded and
 * has no number in JSON.
 */
export function velocityOfSlowness(slownessMsPerM: number): number | null {
  const v = 1000 / slownessMsPerM;
  return Number.isFinite(v) ? v : null;
}

/** A branch's apparent velocity for arithmetic: a level branch (null) is infinitely fast, as its slope says. */
export function apparentVelocity(line: BranchLine): number {
  return line.velocity ?? Infinity;
}

/** Time on a branch line at an offset, ms. */
export function timeOnBranchMs(line: BranchLine, offsetM: number): number {
  return line.interceptMs + (1000 * offsetM) / apparentVelocity(line);
}

/**
 * Offset where the refracted line overtakes the direct line, m:
 * x_c = (t_i,refr − t_i,dir) / (1000/V_dir − 1000/V_refr). Null when either is missing,
 * the refracted line is not faster, or the lines cross behind the shot.
 */
export function crossoverDistanceM(direct: BranchLine | null, refracted: BranchLine | undefined): number | null {
  if (!direct || !refracted) return null;
  const dSlowness = 1000 / apparentVelocity(direct) - 1000 / apparentVelocity(refracted);
  if (!(dSlowness > 0)) return null;
  const x = (refracted.interceptMs - direct.interceptMs) / dSlowness;
  return Number.isFinite(x) && x >= 0 ? x : null;
}
