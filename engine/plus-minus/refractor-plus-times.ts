/**
 * The plus-minus core, the same for every refractor: opposing pairs' head-wave times →
 * T+ and T− per pair (plus-minus.ts) → joint adjustment of the trusted pairs' reciprocal
 * times and the inverse-variance mean of T+ per geophone (weighted-plus-times.ts) →
 * delay times T+/2 (Hagedoorn, Geophysical Prospecting 7, 1959). The caller builds the
 * pairs of its refractor (which picks, which phantoms, which reciprocal readings); from
 * there on the first and the second refractor go through this one code.
 * Units: ms, ms², m. Cost: O(pairs · geophones) plus the adjustment (reciprocal-adjustment.ts).
 */
import type { ShotAnalysis } from '../output/interpretation.js';
import { plusMinus } from './plus-minus.js';
import { weightedPlusTimes, type WeightablePair, type WeightedPlusTimes } from './weighted-plus-times.js';

/** The arrivals a shot contributes toward the other shot of a pair. */
export interface HeadWaveTimes {
  /** Refracted time per geophone, ms: the shot's own pick, else a phantom; null elsewhere. */
  timesMs: (number | null)[];
  /** Where the time is a phantom. */
  phantomed: boolean[];
  /** Variance of each time, ms². */
  varianceMs2: (number | null)[];
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
  minusTimeMs: (number | null)[];
  /** Variance of T− per geophone, ms² (the two picks'; tAB cancels out of T−). */
  minusVarianceMs2: (number | null)[];
  /** Geophones where either shot's time was phantomed. */
  phantomUsed: boolean[];
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

/** T+ and T− of one pair at every geophone with their variances (no adjustment yet). */
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
  const pickVariance = (i: number): number => (leftTimes.varianceMs2[i] ?? 0) + (rightTimes.varianceMs2[i] ?? 0);
  return {
    left,
    right,
    trusted: pair.trusted,
    reciprocalTimeMs: pair.reciprocalTimeMs,
    reciprocalVarianceMs2: pair.reciprocalVarianceMs2,
    plusTimeMs: pm.plusTimeMs,
    minusTimeMs: pm.minusTimeMs,
    phantomUsed: geophoneXM.map((_, i) => pm.plusTimeMs[i] !== null && (leftTimes.phantomed[i] || rightTimes.phantomed[i])),
    minusVarianceMs2: geophoneXM.map((_, i) => (pm.minusTimeMs[i] === null ? null : pickVariance(i))),
    plusVarianceMs2: geophoneXM.map((_, i) => (pm.plusTimeMs[i] === null ? null : pickVariance(i) + pair.reciprocalVarianceMs2)),
  };
}

/** Plus times, their combination and the delay times of one refractor from its opposing pairs. */
export function refractorPlusTimes(inputs: OpposingPairInput[], geophoneXM: number[]): RefractorPlusTimes {
  const pairs = inputs.map((p) => pairPlusMinus(p, geophoneXM));
  const combined = weightedPlusTimes(pairs, geophoneXM.length);
  const delayTimeMs = combined.plusTimeMs.map((t) => (t === null ? null : t / 2));
  const delaySource = combined.plusTimeMs.map((t, i): PairDelaySource =>
    t === null ? null : combined.contributing[i].some((k) => pairs[k].phantomUsed[i]) ? 'phantom' : 'pair',
  );
  return { pairs, combined, delayTimeMs, delaySource };
}

/** T− of the widest pair covering each geophone (pairs' minus times differ by a constant). Cost: O(pairs log pairs + pairs · geophones). */
export function widestPairMinusTimes(pairs: PairPlusMinus[], geophoneCount: number): (number | null)[] {
  const byWidth = [...pairs].sort((p, q) => q.right.x - q.left.x - (p.right.x - p.left.x));
  return Array.from({ length: geophoneCount }, (_, i) => byWidth.find((p) => p.minusTimeMs[i] !== null)?.minusTimeMs[i] ?? null);
}
