/**
 * The plus-minus core, the same for every refractor: opposing pairs' head-wave times →
 * T+ and T− per pair (plus-minus.ts) → joint adjustment of the trusted pairs' reciprocal
 * times and the inverse-variance mean of T+ per geophone (weighted-plus-times.ts) →
 * delay times T+/2 (Hagedoorn, Geophysical Prospecting 7, 1959). The caller builds the
 * pairs of its refractor (which picks, which phantoms, which reciprocal readings); from
 * there on the first and the second refractor go through this one code.
 * Units: ms, ms², m. Cost: O(pairs · geophones) plus the adjustment (reciprocal-adjustment.ts).
 * Per-pair arrays are arrays of doubles with NaN for "none" (shared/nan-none.ts).
 */
import type { ShotAnalysis } from '../output/interpretation.js';
import { isSome, type NanNone } from '../shared/nan-none.js';
import { plusMinus } from './plus-minus.js';
import { weightedPlusTimes, type WeightablePair, type WeightedPlusTimes } from './weighted-plus-times.js';
import { zeros, type Doubles } from '../shared/zeros.js';

/** The arrivals a shot contributes toward the other shot of a pair. */
export interface HeadWaveTimes {
  /** Refracted time per geophone, ms: the shot's own pick, else a phantom; NaN elsewhere. */
  timesMs: NanNone;
  /** Where the time is a phantom. */
  phantomed: boolean[];
  /** Variance of each time, ms²; NaN where no time. */
  varianceMs2: NanNone;
}

/** One opposing pair as the core needs it: left shot shooting right, right shot shooting left. */
export interface OpposingPairInput {
  left: ShotAnalysis;
  right: ShotAnalysis;
  leftTimes: HeadWaveTimes;
  rightTimes: HeadWaveTimes;
  /** Reciprocal time tAB on this refractor, ms, and its variance, ms². */
  reciprocalTimeMs: number;
  reciprocalVarianceMs2: number;
  /** The pair's reciprocal readings agree (or cannot be compared): it takes part in the adjustment. */
  trusted: boolean;
}

/** A pair's plus and minus times with their variances (T+ after the joint adjustment). */
export interface PairPlusMinus extends WeightablePair {
  left: ShotAnalysis;
  right: ShotAnalysis;
  /** T− per geophone, ms; NaN where none. */
  minusTimeMs: NanNone;
  /** Variance of T− per geophone, ms² (the two picks'; tAB cancels out of T−); NaN where none. */
  minusVarianceMs2: NanNone;
  /** Geophones where either shot's time was phantomed (1), with a T+. */
  phantomUsed: Doubles;
}

/** How a geophone's delay time was found: from picks of a pair, with a phantom, or none. */
export type PairDelaySource = 'pair' | 'phantom' | null;

export interface RefractorPlusTimes {
  pairs: PairPlusMinus[];
  /** The weighted combination (T+, σ, contributing pairs, fallback flags, trusted χ²). */
  combined: WeightedPlusTimes;
  /** Delay time T+/2 per geophone, ms. */
  delayTimeMs: (number | null)[];
  delaySource: PairDelaySource[];
}

/** T+ and T− of one pair at every geophone with their variances (no adjustment yet). O(N), five arrays of N. */
export function pairPlusMinus(pair: OpposingPairInput, geophoneXM: number[]): PairPlusMinus {
  const { left, right, leftTimes, rightTimes } = pair;
  const pm = plusMinus({
    leftShotXM: left.x,
    rightShotXM: right.x,
    geophoneXM,
    leftTimesMs: leftTimes.timesMs,
    rightTimesMs: rightTimes.timesMs,
    reciprocalTimeMs: pair.reciprocalTimeMs,
  });
  const n = geophoneXM.length;
  const phantomUsed = zeros(n);
  const minusVarianceMs2 = zeros(n);
  const plusVarianceMs2 = zeros(n);
  for (let i = 0; i < n; i++) {
    // A time without a variance counts as variance 0, as before the arrays were typed.
    const lv = leftTimes.varianceMs2[i];
    const rv = rightTimes.varianceMs2[i];
    const pickVariance = (isSome(lv) ? lv : 0) + (isSome(rv) ? rv : 0);
    const hasPlus = isSome(pm.plusTimeMs[i]);
    phantomUsed[i] = hasPlus && (leftTimes.phantomed[i] || rightTimes.phantomed[i]) ? 1 : 0;
    minusVarianceMs2[i] = isSome(pm.minusTimeMs[i]) ? pickVariance : Number.NaN;
    plusVarianceMs2[i] = hasPlus ? pickVariance + pair.reciprocalVarianceMs2 : Number.NaN;
  }
  return {
    left,
    right,
    trusted: pair.trusted,
    reciprocalTimeMs: pair.reciprocalTimeMs,
    reciprocalVarianceMs2: pair.reciprocalVarianceMs2,
    plusTimeMs: pm.plusTimeMs,
    minusTimeMs: pm.minusTimeMs,
    phantomUsed,
    minusVarianceMs2,
    plusVarianceMs2,
  };
}

/** Plus times, their combination and the delay times of one refractor from its opposing pairs. */
export function refractorPlusTimes(inputs: OpposingPairInput[], geophoneXM: number[]): RefractorPlusTimes {
  const pairs = inputs.map((p) => pairPlusMinus(p, geophoneXM));
  const combined = weightedPlusTimes(pairs, geophoneXM.length);
  const delayTimeMs = combined.plusTimeMs.map((t) => (t === null ? null : t / 2));
  const delaySource = combined.plusTimeMs.map((t, i): PairDelaySource =>
    t === null ? null : combined.contributing[i].some((k) => pairs[k].phantomUsed[i] === 1) ? 'phantom' : 'pair',
  );
  return { pairs, combined, delayTimeMs, delaySource };
}

/** T− of the widest pair covering each geophone (pairs' minus times differ by a constant). Cost: O(pairs log pairs + pairs · geophones). */
export function widestPairMinusTimes(pairs: PairPlusMinus[], geophoneCount: number): (number | null)[] {
  const byWidth = [...pairs].sort((p, q) => q.right.x - q.left.x - (p.right.x - p.left.x));
  return Array.from({ length: geophoneCount }, (_, i) => {
    const p = byWidth.find((q) => isSome(q.minusTimeMs[i]));
    return p ? p.minusTimeMs[i] : null;
  });
}
