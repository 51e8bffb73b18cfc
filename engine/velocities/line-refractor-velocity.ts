/**
 * One refractor velocity V2 for the line from the minus times of every pair (their common
 * slope against x is 2/V2: Hagedoorn, Geophysical Prospecting 7, 1959; minus-time-velocity.ts):
 * the reference the structure search starts from.
 */
import type { Warning } from '../output/interpretation.js';
import type { PairPlusMinus } from '../plus-minus/refractor-plus-times.js';
import { segmentMinusVelocity } from '../structure/structure-features.js';
import type { MinusTimeVelocityResult } from './minus-time-velocity.js';
import { velocityWords } from '../qc/wording.js';

export interface LineRefractorVelocity {
  /** The pairs whose T− are used: the trusted ones, else all. */
  minusPairs: PairPlusMinus[];
  /** T− against x over the whole line. */
  fit: MinusTimeVelocityResult;
  /** V2, m/s; null when the fit fails or V2 is not above V1 (then a warning says why). */
  velocity: number | null;
  warnings: Warning[];
}

/** The line V2 and why there is none (few-refracted-picks, v2-not-above-v1). Cost: O(pairs · geophones). */
export function lineRefractorVelocity(pairs: PairPlusMinus[], geophoneXM: number[], v1: number | null): LineRefractorVelocity {
  const trusted = pairs.filter((p) => p.trusted);
  const minusPairs = trusted.length > 0 ? trusted : pairs.filter((p) => !p.trusted);
  const fit = segmentMinusVelocity(minusPairs.map((p) => p.minusTimeMs), geophoneXM, geophoneXM.map(() => true));
  const warnings: Warning[] = [];
  const none = (w?: Warning): LineRefractorVelocity => {
    if (w) warnings.push(w);
    return { minusPairs, fit, velocity: null, warnings };
  };
  if (!fit.ok) {
    if (pairs.length === 0) return none();
    return none(
      fit.reason === 'too-few-points'
        ? {
            code: 'few-refracted-picks',
            message: `Only ${fit.count} geophone(s) have refracted arrivals from both shots of an opposing pair: too few to find the refractor velocity V2 from the minus times, so no depths are given.`,
          }
        : {
            code: 'v2-not-above-v1',
            message: 'The minus times do not increase along the line, so they give no refractor velocity: the picks may mix branches or the shots may be mislabelled. No depths are given.',
          },
    );
  }
  if (v1 !== null && !(fit.velocity > v1)) {
    return none({
      code: 'v2-not-above-v1',
      message: `The refractor velocity from the minus times (${velocityWords(fit.velocity)}) is not above the top-layer velocity (${velocityWords(v1)}): no head wave could come from such a layer, so no depths are given. Check the branch assignment.`,
    });
  }
  return { minusPairs, fit, velocity: fit.velocity, warnings };
}
