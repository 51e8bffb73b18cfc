/**
 * Plus times of several opposing pairs on one refractor combined (docs/developers/plus-minus.md,
 * steps 4–6); called by the plus-minus core of every refractor (refractor-plus-times.ts):
 *  - variance of a reciprocal time tAB = mean of its readings: each reading σ² at a
 *    geophone, σ²·(1 + (gap/2d)²) when extrapolated a distance gap beyond its picks (d the
 *    geophone spacing; our choice, shaped like the variance of a line extrapolated beyond
 *    its data), Σ v/m² over the m readings, plus (difference/2)² when two readings disagree;
 *  - joint least-squares adjustment of the trusted pairs' tAB (adjustReciprocalTimes,
 *    reciprocal/reciprocal-adjustment.ts);
 *  - inverse-variance mean per geophone (combineWeighted, plus-minus.ts; Bevington &
 *    Robinson 2003, ch. 4), trusted pairs first, the others only where no trusted pair reaches.
 * Every pair estimates the same 2·delay at a geophone (Hagedoorn, Geophysical Prospecting 7,
 * 1959). Units: ms, ms², m.
 */
import { adjustReciprocalTimes, type AdjustablePair } from '../reciprocal/reciprocal-adjustment.js';
import { isSome } from '../shared/nan-none.js';
import { combineWeighted, type WeightedCombination } from './plus-minus.js';

/** One reading of a reciprocal time: how far (m) it lies from the picks it rests on (0 at a geophone). */
export interface ReciprocalReading {
  timeMs: number;
  gapM: number;
}

/** Variance of one reading, ms²: σ²·(1 + (gap/2d)²). */
export function readingVarianceMs2(gapM: number, pickSigmaMs: number, spacingM: number): number {
  const d = spacingM > 0 ? spacingM : 1;
  return pickSigmaMs * pickSigmaMs * (1 + (gapM / (2 * d)) ** 2);
}

/**
 * Reciprocal time of a pair from one or two readings (their mean) and its variance, ms and
 * ms²; null without a reading.
 */
export function reciprocalTimeOf(readings: ReciprocalReading[], pickSigmaMs: number, spacingM: number): { timeMs: number; varianceMs2: number } | null {
  if (readings.length === 0) return null;
  const m = readings.length;
  const timeMs = readings.reduce((s, r) => s + r.timeMs, 0) / m;
  const fromReadings = readings.reduce((s, r) => s + readingVarianceMs2(r.gapM, pickSigmaMs, spacingM), 0) / (m * m);
  const misfit = m === 2 ? ((readings[0].timeMs - readings[1].timeMs) / 2) ** 2 : 0;
  return { timeMs, varianceMs2: fromReadings + misfit };
}

/** A pair as the combination needs it; `trusted` when its reciprocal readings agree (or cannot be compared). */
export interface WeightablePair extends AdjustablePair {
  trusted: boolean;
}

export interface WeightedPlusTimes {
  /** T+ per geophone, ms; null where no pair covers it. */
  plusTimeMs: (number | null)[];
  /** One standard deviation of T+, ms. */
  plusSigmaMs: (number | null)[];
  /** Indices of the pairs that gave T+ at each geophone. */
  contributing: number[][];
  /** True where only untrusted pairs reach. */
  fromUntrusted: boolean[];
  /** The trusted pairs' combination (χ² per geophone for consistency checks). */
  trusted: WeightedCombination;
}

/**
 * Adjusts the trusted pairs' reciprocal times together (mutating them, as
 * adjustReciprocalTimes does), then combines T+ by inverse variance.
 */
export function weightedPlusTimes(pairs: WeightablePair[], geophoneCount: number): WeightedPlusTimes {
  adjustReciprocalTimes(pairs.filter((p) => p.trusted));
  const combine = (ps: WeightablePair[]): WeightedCombination =>
    combineWeighted(ps.map((p) => p.plusTimeMs), ps.map((p) => p.plusVarianceMs2), geophoneCount);
  const trusted = combine(pairs.filter((p) => p.trusted));
  const untrusted = combine(pairs.filter((p) => !p.trusted));
  const out: WeightedPlusTimes = { plusTimeMs: [], plusSigmaMs: [], contributing: [], fromUntrusted: [], trusted };
  for (let i = 0; i < geophoneCount; i++) {
    const fallback = trusted.valueMs[i] === null && untrusted.valueMs[i] !== null;
    const source = fallback ? untrusted : trusted;
    out.plusTimeMs.push(source.valueMs[i]);
    out.plusSigmaMs.push(source.sigmaMs[i]);
    out.fromUntrusted.push(fallback);
    const used: number[] = [];
    for (let k = 0; k < pairs.length; k++) {
      const p = pairs[k];
      const v = p.plusVarianceMs2[i];
      // NaN is "none" in the per-pair arrays (shared/nan-none.ts); NaN > 0 is false.
      if (p.trusted !== fallback && isSome(p.plusTimeMs[i]) && v > 0) used.push(k);
    }
    out.contributing.push(used);
  }
  return out;
}
