/**
 * The time-term inversion's own results as the interpretation carries them, rounded with the
 * one decimals table (output/output-decimals.ts), called from toInterpretation. The open
 * ends of the first and last slowness segments are closed at the geophones the terms cover.
 */
import type { TimeTermAnalysis } from '../output/interpretation.js';
import { roundM, roundMs, roundMsOrNull, roundV } from '../output/output-decimals.js';
import type { TimeTermSolution } from './time-terms.js';

export type TimeTermRecord = TimeTermSolution & { shotIds: string[] };

/** The analysis block; `coveredXsM` the geophones with a time term, in order. O(shots + segments). */
export function timeTermOutput(solution: TimeTermRecord, shotXsM: readonly number[], coveredXsM: readonly number[]): TimeTermAnalysis {
  const first = coveredXsM[0] ?? 0;
  const last = coveredXsM[coveredXsM.length - 1] ?? 0;
  return {
    picks: solution.count,
    unknowns: solution.unknowns,
    rmsMs: roundMs(solution.rmsMs),
    noiseMs: roundMs(solution.sigmaMs),
    segments: solution.segments.map((s) => ({
      from: roundM(Number.isFinite(s.fromM) ? s.fromM : first),
      to: roundM(Number.isFinite(s.toM) ? s.toM : last),
      velocity: roundV(s.velocityMPerS),
      standardError: roundV(s.standardErrorMPerS),
    })),
    shots: solution.shotIds.map((id, i) => ({
      shot: id,
      x: shotXsM[i],
      timeTerm: roundMsOrNull(solution.shotTermMs[i]),
      standardError: roundMsOrNull(solution.shotTermSigmaMs[i]),
    })),
  };
}
