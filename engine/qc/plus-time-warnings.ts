/**
 * Warnings about the plus times of the first refractor: no opposing pair, pairs that
 * disagree, plus times from pairs that fail the reciprocal check, negative delay times.
 */
import type { Warning } from '../output/interpretation.js';
import type { RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import { chiSquareQuantile } from '../structure/quantiles.js';
import { positionText, positionsText } from './wording.js';

/** χ² level above which the pairs' T+ at a geophone are said to disagree. Our choice (a 0.1 % false alarm per geophone). */
const DISAGREEMENT_LEVEL = 0.999;

/** The plus-time warnings in the order the section reports them; `opposingPairCount` counts pairs before the reciprocal check. */
export function plusTimeWarnings(xsM: number[], plus: RefractorPlusTimes, opposingPairCount: number): Warning[] {
  const warnings: Warning[] = [];
  if (opposingPairCount === 0) {
    warnings.push({
      code: 'no-opposing-pair',
      message: 'No two shots record refracted arrivals toward each other over a common stretch of the line, so plus times (and depths) cannot be found. Shoot from both ends of the spread.',
    });
  }
  warnings.push(...pairDisagreementWarnings(xsM, plus));
  const misfitXs = xsM.filter((_, i) => plus.combined.fromUntrusted[i]);
  if (misfitXs.length > 0) {
    warnings.push({
      code: 'plus-time-from-misfit-pair',
      message: `At ${positionsText(misfitXs)} the only plus times come from shot pairs that fail the reciprocal check; the depths there are doubtful.`,
      x: misfitXs[0],
    });
  }
  return warnings;
}

/**
 * Pairs whose T+ at a geophone disagree beyond their variances (χ² above its 99.9 %
 * quantile, pairCount − 1 degrees of freedom): one warning per run of such geophones.
 * A steep dip, a step near one pair's shots or a bad pick does this. Cost: O(geophones).
 */
function pairDisagreementWarnings(xsM: number[], plus: RefractorPlusTimes): Warning[] {
  const combined = plus.combined.trusted;
  const bad = xsM.map((_, i) => {
    const c = combined.chiSquare[i];
    return c !== null && c > chiSquareQuantile(DISAGREEMENT_LEVEL, combined.pairCount[i] - 1);
  });
  const warnings: Warning[] = [];
  for (let i = 0; i < xsM.length; i++) {
    if (!bad[i] || (i > 0 && bad[i - 1])) continue;
    let j = i;
    while (j + 1 < xsM.length && bad[j + 1]) j++;
    warnings.push({
      code: 'plus-times-disagree',
      message:
        `At ${i === j ? `x = ${positionText(xsM[i])} m` : `x = ${positionText(xsM[i])}–${positionText(xsM[j])} m`} the opposing pairs give plus times that differ by more than ` +
        `their pick uncertainty allows: a steep dip, a step near one pair's shots or a bad pick. The weighted mean is used.`,
      x: xsM[i],
    });
  }
  return warnings;
}

/** "negative-delay-time" where a delay time is below zero (only said when V1 and V2 are known). */
export function negativeDelayWarnings(xsM: number[], delayTimeMs: (number | null)[]): Warning[] {
  const negative = xsM.filter((_, i) => delayTimeMs[i] !== null && (delayTimeMs[i] as number) < 0);
  if (negative.length === 0) return [];
  return [
    {
      code: 'negative-delay-time',
      message: `Negative delay time at ${positionsText(negative)}: the picks there disagree with the reciprocal time (a bad pick or a wrong branch); no depth is given there.`,
      x: negative[0],
    },
  ];
}
