/**
 * Delay times to one refractor k (branch k of the picks: 1 the first, 2 the second) under
 * every geophone, and the velocity of the layer below it. In order of preference:
 *  1. plus-minus (Hagedoorn, Geophysical Prospecting 7, 1959) through the same core as the
 *     two-layer section (refractor-plus-times.ts): T+ = tAG + tBG − tAB, delay = T+/2, the
 *     pairs' T+ combined by inverse variance after the joint adjustment of their tAB. The
 *     pairs of refractor k are built here: tAB is the branch-k reciprocal time (the shot's
 *     branch-k pick at the other shot's position, else its branch-k line extrapolated
 *     there; the first arrival there may belong to another branch, which plus-minus must
 *     not use); a shot's missing branch-k arrivals are phantomed from a shot further out on
 *     the same side (phantom.ts).
 *  2. "intercept" delay times where no opposing pair reaches: with one shot A only,
 *     delay(G) = tAG − |x_G − x_A|/V − tᵢ(A)/2, the delay under the shot taken as half its
 *     branch-k intercept time (flat layers under the shot: Kearey, Brooks & Hill 2002,
 *     ch. 5; the time-term view of Palmer 1980). Averaged over the shots that reach G.
 * Velocity below refractor k: the common slope of T− against x (2/V, minus-time-velocity.ts);
 * without a pair, the gentle-dip slope-intercept mean 2·Vd·Vu/(Vd + Vu) of opposing branch-k
 * lines; with branch k seen one way only, the mean apparent velocity of its lines.
 * Units: m, ms, m/s. Unrounded.
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import { resolveOptions, type ResolvedOptions } from '../survey/options.js';
import { isFiniteNumber } from '../shared/numbers.js';
import { fromNullable, isSome, type NanNone } from '../shared/nan-none.js';
import { refractedTimes, type RefractorIndex, type Side } from '../branches/refracted-times.js';
import { fitLine, type FitPoint } from '../branches/segmented-fit.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { phantomArrivals, phantomVarianceMs2 } from '../plus-minus/phantom.js';
import { refractorPlusTimes, type OpposingPairInput } from '../plus-minus/refractor-plus-times.js';
import { reciprocalTimeOf, type ReciprocalReading } from '../plus-minus/weighted-plus-times.js';
import { extrapolationAllowanceMs } from '../reciprocal/reciprocal-checks.js';
import { minusTimeVelocity } from '../velocities/minus-time-velocity.js';

/** How a station's delay time to a refractor was found. */
export type DelaySource = 'pair' | 'phantom' | 'intercept' | 'interpolated' | null;

/** Delay times to one refractor (branch k) along the line, and the velocity below it. */
export interface RefractorDelays {
  /** Velocity of the layer below the refractor, m/s; null when not found. */
  velocityMPerS: number | null;
  velocitySource: 'minus-times' | 'slope-intercept' | 'one-way-apparent' | null;
  /** Delay time per geophone, ms. */
  delayTimeMs: (number | null)[];
  delaySource: DelaySource[];
  /** Opposing pairs that gave plus times. */
  pairCount: number;
}

interface OneWayTimes {
  shot: ShotAnalysis;
  /** Direction the arrivals travel from the shot. */
  side: Side;
  /** Branch-k time per geophone, ms; NaN where none (shared/nan-none.ts: it feeds the per-pair arrays). */
  timesMs: NanNone;
  phantomed: boolean[];
  /** Variance of each time, ms²: σ² for a pick, the phantom's variance (phantom.ts) for a phantom; NaN where none. */
  varianceMs2: NanNone;
  /** Branch-k picks of that side as a straight line (least squares), when ≥ 2 picks. */
  line: { velocity: number; interceptMs: number } | null;
}

/** Least-squares line through a side's branch picks (t = a + 1000·offset/V); null below 2 picks or for a non-positive slope. */
function branchLine(survey: Survey, shotX: number, timesMs: (number | null)[]): OneWayTimes['line'] {
  const points: FitPoint[] = [];
  timesMs.forEach((t, i) => {
    if (t !== null) points.push({ offsetM: Math.abs(survey.geophones[i].x - shotX), timeMs: t });
  });
  const l = fitLine(points, points.map((_, i) => i));
  if (!l || !(l.slownessMsPerM > 0)) return null;
  return { velocity: 1000 / l.slownessMsPerM, interceptMs: l.interceptMs };
}

/**
 * Branch-k arrivals of every shot toward one side, completed by phantoming from the shot
 * further out on the same side that fills most geophones (nearest first on ties).
 */
function oneWayTimes(survey: Survey, shots: ShotAnalysis[], side: Side, k: RefractorIndex, pickSigmaMs: number): OneWayTimes[] {
  const own = shots.map((shot) => ({ shot, timesMs: refractedTimes(survey, shot, side, k) }));
  return own.map(({ shot, timesMs }) => {
    const eligible = survey.geophones.map((g) => (side === 'right' ? g.x > shot.x : g.x < shot.x));
    const behind = own
      .filter((o) => o.shot.id !== shot.id && (side === 'right' ? o.shot.x < shot.x : o.shot.x > shot.x))
      .sort((p, q) => Math.abs(p.shot.x - shot.x) - Math.abs(q.shot.x - shot.x));
    let best: ReturnType<typeof phantomArrivals> = null;
    for (const from of behind) {
      const r = phantomArrivals({ targetRefractedMs: timesMs, sourceRefractedMs: from.timesMs, eligible });
      if (r && r.phantomCount > 0 && (!best || r.phantomCount > best.phantomCount)) best = r;
    }
    const phantomed = timesMs.map((t, i) => t === null && !!best && best.timesMs[i] !== null);
    const phantomVariance = best ? phantomVarianceMs2(best, pickSigmaMs) : null;
    return {
      shot,
      side,
      timesMs: fromNullable(timesMs.map((t, i) => (t !== null ? t : phantomed[i] ? best!.timesMs[i] : null))),
      phantomed,
      varianceMs2: fromNullable(timesMs.map((t, i) => (t !== null ? pickSigmaMs * pickSigmaMs : phantomed[i] ? phantomVariance : null))),
      line: branchLine(survey, shot.x, timesMs),
    };
  });
}

/**
 * One reading of the branch-k reciprocal time from a shot to `toX`: its branch-k pick at a
 * geophone within a quarter spacing of toX (gap 0), else its branch-k line at that offset,
 * with the gap to its nearest branch-k pick. (The first arrival there may belong to another
 * branch; plus-minus needs the same refractor.)
 */
function reciprocalReading(survey: Survey, w: OneWayTimes, toX: number): ReciprocalReading | null {
  const limit = 0.25 * geophoneSpacingM(survey.geophones);
  const i = survey.geophones.findIndex((g) => Math.abs(g.x - toX) <= limit);
  if (i >= 0 && isFiniteNumber(w.timesMs[i]) && !w.phantomed[i]) return { timeMs: w.timesMs[i], gapM: 0 };
  if (!w.line) return null;
  const gaps = survey.geophones.filter((_, j) => isFiniteNumber(w.timesMs[j]) && !w.phantomed[j]).map((g) => Math.abs(g.x - toX));
  return { timeMs: w.line.interceptMs + (1000 * Math.abs(toX - w.shot.x)) / w.line.velocity, gapM: gaps.length > 0 ? Math.min(...gaps) : 0 };
}

/** Delay times to refractor k (the top of layer k + 1) and the velocity below it (see the file comment). */
export function refractorDelays(survey: Survey, shots: ShotAnalysis[], k: RefractorIndex, options: ResolvedOptions = resolveOptions(survey.options)): RefractorDelays {
  const n = survey.geophones.length;
  const xs = survey.geophones.map((g) => g.x);
  const pickSigmaMs = options.pickUncertaintyMs;
  const toleranceMs = options.reciprocalToleranceMs;
  const spacingM = geophoneSpacingM(survey.geophones);
  const toRight = oneWayTimes(survey, shots, 'right', k, pickSigmaMs);
  const toLeft = oneWayTimes(survey, shots, 'left', k, pickSigmaMs);

  // Every opposing pair with branch-k arrivals over a common stretch, through the same
  // plus-minus core as the two-layer section (refractor-plus-times.ts).
  const inputs: OpposingPairInput[] = [];
  for (const a of toRight) {
    for (const b of toLeft) {
      if (!(b.shot.x > a.shot.x)) continue;
      const overlap = xs.some((x, i) => x > a.shot.x && x < b.shot.x && isSome(a.timesMs[i]) && isSome(b.timesMs[i]));
      if (!overlap) continue;
      const forward = reciprocalReading(survey, a, b.shot.x);
      const reverse = reciprocalReading(survey, b, a.shot.x);
      const tAB = reciprocalTimeOf([forward, reverse].filter((r): r is ReciprocalReading => r !== null), pickSigmaMs, spacingM);
      if (tAB === null) continue;
      // Trusted as in the reciprocal check (reciprocal-checks.ts): readings within the
      // tolerance plus the allowance for long extrapolations; one reading cannot be checked.
      const trusted = !forward || !reverse || Math.abs(forward.timeMs - reverse.timeMs) <= toleranceMs + extrapolationAllowanceMs(forward.gapM, reverse.gapM, spacingM, pickSigmaMs);
      inputs.push({ left: a.shot, right: b.shot, leftTimes: a, rightTimes: b, reciprocalTimeMs: tAB.timeMs, reciprocalVarianceMs2: tAB.varianceMs2, trusted });
    }
  }
  const core = refractorPlusTimes(inputs, xs);
  const pairs = core.pairs;

  // Velocity below the refractor.
  let velocity: number | null = null;
  let velocitySource: RefractorDelays['velocitySource'] = null;
  const fit = minusTimeVelocity(
    pairs.map((p) => {
      const idx = xs.map((_, i) => i).filter((i) => isSome(p.minusTimeMs[i]));
      return { xM: idx.map((i) => xs[i]), minusTimeMs: idx.map((i) => p.minusTimeMs[i]) };
    }),
  );
  if (fit.ok) {
    velocity = fit.velocity;
    velocitySource = 'minus-times';
  } else {
    const lines = (ws: OneWayTimes[]): number[] => ws.map((w) => w.line?.velocity).filter((v): v is number => isFiniteNumber(v) && v > 0);
    const mean = (vs: number[]): number => vs.reduce((sum, v) => sum + v, 0) / vs.length;
    const right = lines(toRight);
    const left = lines(toLeft);
    if (right.length > 0 && left.length > 0) {
      velocity = (2 * mean(right) * mean(left)) / (mean(right) + mean(left));
      velocitySource = 'slope-intercept';
    } else if (right.length + left.length > 0) {
      velocity = mean([...right, ...left]);
      velocitySource = 'one-way-apparent';
    }
  }

  const delayTimeMs: (number | null)[] = [...core.delayTimeMs];
  const delaySource: DelaySource[] = [...core.delaySource];
  if (velocity !== null) {
    // One-way "intercept" delays where no pair reaches.
    for (let i = 0; i < n; i++) {
      if (delayTimeMs[i] !== null) continue;
      const single: number[] = [];
      for (const w of [...toRight, ...toLeft]) {
        const t = w.timesMs[i];
        if (!isFiniteNumber(t) || w.phantomed[i] || !w.line) continue;
        single.push(t - (1000 * Math.abs(xs[i] - w.shot.x)) / velocity - w.line.interceptMs / 2);
      }
      if (single.length > 0) {
        delayTimeMs[i] = single.reduce((sum, v) => sum + v, 0) / single.length;
        delaySource[i] = 'intercept';
      }
    }
  }
  return { velocityMPerS: velocity, velocitySource, delayTimeMs, delaySource, pairCount: pairs.length };
}

