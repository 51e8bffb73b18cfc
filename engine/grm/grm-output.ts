/**
 * GRM's result where the rest of the engine reads plus-minus times: the time-depths take the
 * place of the delay times (Palmer 1980: t_G is the delay-time analogue at the optimum XY),
 * and the XY functions rounded for the interpretation with the one decimals table
 * (output/output-decimals.ts), called from toInterpretation.
 */
import type { RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import type { GrmAnalysis } from '../output/interpretation.js';
import { roundM, roundMsOrNull, roundVOrNull } from '../output/output-decimals.js';
import type { GrmResult } from './grm.js';

/** Words for the criterion (optimum-xy.ts gives the source). */
export const GRM_CRITERION =
  'least RMS residual of the velocity-analysis function about a straight line per shot pair (Palmer 1980: the XY at which it is most nearly linear); ties to the smaller XY';

/**
 * The plus-minus stage's record with GRM's time-depths as delay times and T+ = 2·t_G.
 * Pairs, their contributions and trust flags stay the XY = 0 ones (the warnings about
 * coverage and disagreeing pairs speak of the picks, which are the same). O(N).
 */
export function withTimeDepths(plus: RefractorPlusTimes, grm: GrmResult): RefractorPlusTimes {
  return {
    ...plus,
    delayTimeMs: grm.timeDepthMs.slice(),
    delaySource: plus.delaySource.map((s, i) => (grm.timeDepthMs[i] === null ? null : s ?? 'pair')),
    combined: {
      ...plus.combined,
      plusTimeMs: grm.timeDepthMs.map((t) => (t === null ? null : 2 * t)),
      plusSigmaMs: grm.plusSigmaMs.slice(),
    },
  };
}

/** The analysis as the interpretation carries it: m to 0.01, ms to 0.01, m/s to 1. O(XYs · stations). */
export function grmOutput(grm: GrmResult): GrmAnalysis {
  const best = grm.functions[grm.optimum];
  return {
    optimumXy: roundM(best?.xyM ?? 0),
    expectedOptimumXy: grm.expectedOptimumXyM === null ? null : roundM(grm.expectedOptimumXyM),
    criterion: GRM_CRITERION,
    xyFunctions: grm.functions.map((f) => ({
      xy: roundM(f.xyM),
      refractorVelocity: roundVOrNull(f.refractorVelocityMPerS),
      velocityRoughness: roundMsOrNull(f.velocityRoughnessMs),
      timeDepthDetail: roundMsOrNull(f.timeDepthDetailMs),
      stations: f.stations.stationXM.map((x, j) => ({
        x: roundM(x),
        velocityAnalysis: roundMsOrNull(f.velocityAnalysisMs[j]),
        timeDepth: roundMsOrNull(f.timeDepthMs[j]),
      })),
    })),
  };
}
