/**
 * Three-layer lines: delay times to both refractors under every geophone, the velocity of
 * the third layer V3, and the depth to each refractor by layer stripping.
 *
 * Each refractor k (branch k of the picks: 1 first, 2 second) is handled alike
 * (refractorDelays). Delay times, in order of preference at each geophone:
 *  1. plus-minus on branch k (Hagedoorn, Geophysical Prospecting 7, 1959): for opposing
 *     shots A (left) and B (right) whose branch-k arrivals both reach G,
 *       T+ = tAG + tBG − tAB,   delay(G) = T+/2,
 *     with tAB the branch-k reciprocal time: the shot's branch-k pick at the other shot's
 *     position where there is one, else its branch-k line (least squares through that
 *     side's branch-k picks) extrapolated there; the mean of both readings. The first
 *     arrival at the other shot may belong to another branch, which plus-minus must not use.
 *     A shot's missing branch-k arrivals are phantomed from a shot further out on the same
 *     side (engine/phantom.ts: the two branches are parallel, shifted by a constant).
 *     The pairs' T+ are combined as in the two-layer section (engine/weighted-plus-times.ts):
 *     variances from the picks, phantoms and reciprocal readings, a joint least-squares
 *     adjustment of the trusted pairs' tAB, then the inverse-variance mean per geophone.
 *  2. "intercept" delay times where no opposing pair reaches (poor coverage): with one shot
 *     A only, delay(G) = tAG − |x_G − x_A|/V − tᵢ(A)/2, where the delay under the shot is
 *     taken as half its branch-k intercept time tᵢ(A) (flat layers under the shot:
 *     Kearey, Brooks & Hill 2002, ch. 5; the time-term view of Palmer 1980). Averaged over
 *     the shots that reach G. Less exact under dip: flagged per station and warned.
 *  3. first refractor only: where no shot records it as a first arrival (the second
 *     refractor overtakes it first), the two-layer section's depth if it has one, else its
 *     delay interpolated between the nearest stations that have one (held beyond the last).
 * Velocity below refractor k: from the minus times T− = tAG − tBG (slope 2/V against x;
 * common slope over pairs, engine/minus-time-velocity.ts); without a pair, the gentle-dip
 * slope-intercept mean 2·Vd·Vu/(Vd + Vu) of opposing branch-k lines; with branch k seen one
 * way only, the mean apparent velocity of its lines (dip unknown, so warned). V1 and V2 are
 * the section's own (layers[0], layers[1], or per station where it gives them).
 * Depth: layer stripping (engine/structure/layer-stripping.ts; Kearey, Brooks & Hill 2002,
 * ch. 5; Telford, Geldart & Sheriff 1990, ch. 4):
 *   delay₁ = h1·cos θ12/V1,   delay₂ = h1·cos θ13/V1 + h2·cos θ23/V2,   sin θij = Vi/Vj,
 *   depths = [h1, h1 + h2]. Layers are taken as locally parallel to the ground (flat-layer
 *   formulas at each station).
 * Why the first refractor is redone here on a three-layer line: the two-layer section's
 * reciprocal times are read from the earliest arrival, which on such a line is often the
 * second refractor's, and that inflates T+ of the first refractor.
 *
 * Units: m, ms, m/s. Pure and deterministic; never NaN (null where there is no answer).
 * The velocities and the fallback first-refractor depths are read from the rounded
 * interpretation (1 m/s, 0.01 m): their rounding moves the depths by under 0.1 %.
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation, ShotAnalysis, Station, Warning } from '../output/interpretation.js';
import { phantomArrivals, phantomVarianceMs2 } from '../plus-minus/phantom.js';
import { plusMinus } from '../plus-minus/plus-minus.js';
import { extrapolationAllowanceMs } from '../reciprocal/reciprocal-checks.js';
import { resolveOptions, type ResolvedOptions } from '../survey/options.js';
import { reciprocalTimeOf, weightedPlusTimes, type ReciprocalReading, type WeightablePair } from '../plus-minus/weighted-plus-times.js';
import { minusTimeVelocity } from '../velocities/minus-time-velocity.js';
import { fitLine, type FitPoint } from '../branches/segmented-fit.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { stripLayers } from './layer-stripping.js';

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

export interface SecondRefractorMap {
  /** True when V3 and at least one depth to the second refractor were found. */
  mapped: boolean;
  first: RefractorDelays;
  second: RefractorDelays;
  /** Layer velocities used for stripping (line values), m/s. */
  velocitiesMPerS: (number | null)[];
  /** Vertical depth to each refractor per geophone, m: [first, second]. */
  depthM: [number | null, number | null][];
  warnings: Warning[];
}

type Side = 'left' | 'right';

interface OneWayTimes {
  shot: ShotAnalysis;
  /** Direction the arrivals travel from the shot. */
  side: Side;
  timesMs: (number | null)[];
  phantomed: boolean[];
  /** Variance of each time, ms²: σ² for a pick, the phantom's variance (engine/phantom.ts) for a phantom. */
  varianceMs2: (number | null)[];
  /** Branch-k picks of that side as a straight line (least squares), when ≥ 2 picks. */
  line: { velocity: number; interceptMs: number } | null;
}

function isNum(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

/** Picks of a shot on one side that belong to branch k, ms; null elsewhere. */
function branchTimes(survey: Survey, shot: ShotAnalysis, side: Side, k: 1 | 2): (number | null)[] {
  const times = survey.shots.find((s) => s.id === shot.id)?.times ?? [];
  return survey.geophones.map((g, i) => {
    const t = times[i];
    const onSide = side === 'right' ? g.x > shot.x : g.x < shot.x;
    return onSide && shot.branchOfPick[i] === k && isNum(t) ? t : null;
  });
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
function oneWayTimes(survey: Survey, shots: ShotAnalysis[], side: Side, k: 1 | 2, pickSigmaMs: number): OneWayTimes[] {
  const own = shots.map((shot) => ({ shot, timesMs: branchTimes(survey, shot, side, k) }));
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
      timesMs: timesMs.map((t, i) => (t !== null ? t : phantomed[i] ? best!.timesMs[i] : null)),
      phantomed,
      varianceMs2: timesMs.map((t, i) => (t !== null ? pickSigmaMs * pickSigmaMs : phantomed[i] ? phantomVariance : null)),
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
  if (i >= 0 && isNum(w.timesMs[i]) && !w.phantomed[i]) return { timeMs: w.timesMs[i] as number, gapM: 0 };
  if (!w.line) return null;
  const gaps = survey.geophones.filter((_, j) => isNum(w.timesMs[j]) && !w.phantomed[j]).map((g) => Math.abs(g.x - toX));
  return { timeMs: w.line.interceptMs + (1000 * Math.abs(toX - w.shot.x)) / w.line.velocity, gapM: gaps.length > 0 ? Math.min(...gaps) : 0 };
}

/** Delay times to refractor k (the top of layer k + 1) and the velocity below it (see the file comment). */
export function refractorDelays(survey: Survey, shots: ShotAnalysis[], k: 1 | 2, options: ResolvedOptions = resolveOptions(survey.options)): RefractorDelays {
  const n = survey.geophones.length;
  const xs = survey.geophones.map((g) => g.x);
  const pickSigmaMs = options.pickUncertaintyMs;
  const toleranceMs = options.reciprocalToleranceMs;
  const spacingM = geophoneSpacingM(survey.geophones);
  const toRight = oneWayTimes(survey, shots, 'right', k, pickSigmaMs);
  const toLeft = oneWayTimes(survey, shots, 'left', k, pickSigmaMs);

  // Plus-minus on every opposing pair with branch-k arrivals over a common stretch, with
  // the variances of the two-layer section (docs/developers/plus-minus.md, step 4).
  const pairs: (WeightablePair & { minus: (number | null)[]; phantom: boolean[] })[] = [];
  for (const a of toRight) {
    for (const b of toLeft) {
      if (!(b.shot.x > a.shot.x)) continue;
      const overlap = xs.some((x, i) => x > a.shot.x && x < b.shot.x && a.timesMs[i] !== null && b.timesMs[i] !== null);
      if (!overlap) continue;
      const forward = reciprocalReading(survey, a, b.shot.x);
      const reverse = reciprocalReading(survey, b, a.shot.x);
      const tAB = reciprocalTimeOf([forward, reverse].filter((r): r is ReciprocalReading => r !== null), pickSigmaMs, spacingM);
      if (tAB === null) continue;
      // Trusted as in the reciprocal check (engine/reciprocal.ts): readings within the
      // tolerance plus the allowance for long extrapolations; one reading cannot be checked.
      const trusted = !forward || !reverse || Math.abs(forward.timeMs - reverse.timeMs) <= toleranceMs + extrapolationAllowanceMs(forward.gapM, reverse.gapM, spacingM, pickSigmaMs);
      const pm = plusMinus({ leftShotXM: a.shot.x, rightShotXM: b.shot.x, geophoneXM: xs, leftTimesMs: a.timesMs, rightTimesMs: b.timesMs, reciprocalTimeMs: tAB.timeMs });
      pairs.push({
        plusTimeMs: pm.plusTimeMs,
        plusVarianceMs2: xs.map((_, i) => (pm.plusTimeMs[i] === null ? null : (a.varianceMs2[i] ?? 0) + (b.varianceMs2[i] ?? 0) + tAB.varianceMs2)),
        reciprocalTimeMs: tAB.timeMs,
        reciprocalVarianceMs2: tAB.varianceMs2,
        trusted,
        minus: pm.minusTimeMs,
        phantom: xs.map((_, i) => pm.plusTimeMs[i] !== null && (a.phantomed[i] || b.phantomed[i])),
      });
    }
  }
  const combined = weightedPlusTimes(pairs, n);
  const plus = combined.plusTimeMs;

  // Velocity below the refractor.
  let velocity: number | null = null;
  let velocitySource: RefractorDelays['velocitySource'] = null;
  const fit = minusTimeVelocity(
    pairs.map((p) => {
      const idx = xs.map((_, i) => i).filter((i) => p.minus[i] !== null);
      return { xM: idx.map((i) => xs[i]), minusTimeMs: idx.map((i) => p.minus[i] as number) };
    }),
  );
  if (fit.ok) {
    velocity = fit.velocity;
    velocitySource = 'minus-times';
  } else {
    const lines = (ws: OneWayTimes[]): number[] => ws.map((w) => w.line?.velocity).filter((v): v is number => isNum(v) && v > 0);
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

  const delayTimeMs: (number | null)[] = plus.map((t) => (t === null ? null : t / 2));
  const delaySource: DelaySource[] = plus.map((t, i) => (t === null ? null : combined.contributing[i].some((p) => pairs[p].phantom[i]) ? 'phantom' : 'pair'));
  if (velocity !== null) {
    // One-way "intercept" delays where no pair reaches.
    for (let i = 0; i < n; i++) {
      if (delayTimeMs[i] !== null) continue;
      const single: number[] = [];
      for (const w of [...toRight, ...toLeft]) {
        const t = w.timesMs[i];
        if (!isNum(t) || w.phantomed[i] || !w.line) continue;
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

/** Delay implied by a depth h above a refractor of velocity vBelow, ms: h·cos θ/V1. */
function delayOfDepthMs(depthM: number, v1: number, vBelow: number): number {
  return (1000 * depthM * Math.sqrt(1 - (v1 / vBelow) ** 2)) / v1;
}

/**
 * Both refractors of a three-layer line (see the file comment). Depth to the first
 * refractor: from its own delay times here (branch-1 picks, branch-1 reciprocal times);
 * where those are missing, the two-layer section's depth. Depth to the second: stripping.
 */
export function mapSecondRefractor(survey: Survey, interpretation: Interpretation): SecondRefractorMap {
  const shots = interpretation.shots;
  const stations = interpretation.stations;
  const n = survey.geophones.length;
  const xs = survey.geophones.map((g) => g.x);
  const first = refractorDelays(survey, shots, 1);
  const second = shots.some((s) => s.branchOfPick.includes(2))
    ? refractorDelays(survey, shots, 2)
    : { velocityMPerS: null, velocitySource: null, delayTimeMs: xs.map(() => null), delaySource: xs.map(() => null), pairCount: 0 };
  const warnings: Warning[] = [];
  const v1Line = positive(interpretation.layers[0]?.velocity);
  const v2Line = positive(interpretation.layers[1]?.velocity) ?? positive(first.velocityMPerS);
  const v3 = positive(second.velocityMPerS);
  const depthM: [number | null, number | null][] = xs.map(() => [null, null]);
  const result = (mapped: boolean): SecondRefractorMap => ({ mapped, first, second, velocitiesMPerS: [v1Line, v2Line, v3], depthM, warnings });
  if (!shots.some((s) => s.branchOfPick.includes(2))) return result(false);
  if (v3 === null) {
    warnings.push({
      code: 'second-refractor-no-velocity',
      message: 'Arrivals were assigned to a second refractor but no branch line or minus times give its velocity, so no depths to it are shown.',
    });
    return result(false);
  }
  if (second.velocitySource === 'one-way-apparent') {
    warnings.push({
      code: 'second-refractor-one-way',
      message: `The second refractor's arrivals were recorded shooting one way only, so its velocity (${Math.round(v3)} m/s) is an apparent velocity: too high shooting up-dip, too low down-dip. Shoot from the other end to measure it.`,
    });
  }
  if (v2Line !== null && !(v3 > v2Line)) {
    warnings.push({
      code: 'velocity-inversion',
      message: `The second refractor's velocity (${Math.round(v3)} m/s) is not above the first refractor's (${Math.round(v2Line)} m/s). A layer no faster than the one above gives no head wave, so these arrivals are likely a mis-assigned branch; no depths to a second refractor are given (ASTM D5777; USACE EM 1110-1-1802).`,
    });
    return result(false);
  }

  const velocityAt = (i: number): [number, number] | null => {
    const st: Station | undefined = stations[i];
    const v1 = positive(st?.v1) ?? v1Line;
    const v2 = positive(st?.refractorVelocity) ?? v2Line;
    return v1 === null || v2 === null || !(v2 > v1) || !(v3 > v2) ? null : [v1, v2];
  };
  // First-refractor delay: its own (branch-1 picks), else the two-layer section's depth.
  const firstDelay: (number | null)[] = xs.map((_, i) => {
    const v = velocityAt(i);
    const own = first.delayTimeMs[i];
    if (isNum(own) && own >= 0) return own;
    const st = stations[i];
    return v && st && isNum(st.depth) && st.depth >= 0 ? delayOfDepthMs(st.depth, v[0], v[1]) : null;
  });
  // Where the first refractor gives no first arrival at all (the second takes over before
  // it is seen), its delay is interpolated between the nearest stations that have one, or
  // held beyond the last. Common practice for a layer seen over part of the line only;
  // flagged per station and warned.
  const interpolated = fillGaps(xs, firstDelay, (i) => second.delayTimeMs[i] !== null);
  interpolated.filled.forEach((f, i) => {
    if (f) first.delaySource[i] = 'interpolated';
  });

  const noFirst: number[] = [];
  const noAnswer: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = velocityAt(i);
    if (v === null) continue;
    const [v1, v2] = v;
    const d1 = interpolated.values[i];
    const d2 = second.delayTimeMs[i];
    if (d1 === null) {
      if (d2 !== null) noFirst.push(xs[i]);
      continue;
    }
    depthM[i][0] = stripLayers([d1], [v1, v2])?.depthsM[0] ?? null;
    if (d2 === null) continue;
    const stripped = d2 >= 0 ? stripLayers([d1, d2], [v1, v2, v3]) : null;
    if (stripped === null) noAnswer.push(xs[i]);
    else depthM[i][1] = stripped.depthsM[1];
  }
  if (noFirst.length > 0) {
    warnings.push({
      code: 'second-refractor-no-first-depth',
      message: `At ${describeXs(noFirst)} there is a delay time to the second refractor but none to the first, so the second depth cannot be stripped there.`,
      x: noFirst[0],
    });
  }
  if (noAnswer.length > 0) {
    warnings.push({
      code: 'second-refractor-above-first',
      message: `At ${describeXs(noAnswer)} the second refractor's delay time is smaller than the first refractor's depth allows (a negative layer thickness), so no second depth is given there: check the branch assignment and the picks.`,
      x: noAnswer[0],
    });
  }
  const interpolatedXs = xs.filter((_, i) => interpolated.filled[i] && depthM[i][1] !== null);
  if (interpolatedXs.length > 0) {
    warnings.push({
      code: 'first-refractor-interpolated',
      message: `At ${describeXs(interpolatedXs)} no shot records the first refractor as a first arrival (the second refractor's arrivals overtake it first), so its delay time there is interpolated between the neighbouring stations (held at the nearest one beyond the last); the split of depth between the two layers there is less certain.`,
      x: interpolatedXs[0],
    });
  }
  const fromIntercepts = xs.filter((_, i) => depthM[i][1] !== null && (second.delaySource[i] === 'intercept' || first.delaySource[i] === 'intercept'));
  if (fromIntercepts.length > 0) {
    warnings.push({
      code: 'delay-from-intercepts',
      message: `At ${describeXs(fromIntercepts)} no opposing pair of shots records one of the refractors, so its delay times come from one-way arrivals and half the shots' intercept times (flat layers under the shots assumed); those depths are less certain.`,
      x: fromIntercepts[0],
    });
  }
  return result(depthM.some((d) => d[1] !== null));
}

/**
 * The interpretation with the second refractor added when branch 2 was found (see the
 * file comment): stations[].depths = [first, second], depth / refractorElevation /
 * delayTime of the first refractor from this map, a third layer velocity, and the
 * "second refractor not mapped" note and the first refractor's no-coverage notes that
 * this map fills replaced by its own warnings. Unchanged when no pick is on branch 2 (a
 * forced three-layer count with none found is said by a warning).
 */
export function withSecondRefractor(survey: Survey, interpretation: Interpretation): Interpretation {
  const found = interpretation.shots.some((s) => s.branchOfPick.includes(2));
  if (!found) {
    if (survey.options?.layers !== 3) return interpretation;
    const warning: Warning = {
      code: 'second-refractor-not-found',
      message: 'Three layers were asked for, but no shot has enough arrivals beyond the first refracted branch to form a second one, so only the first refractor is mapped.',
    };
    return { ...interpretation, qc: { ...interpretation.qc, warnings: [...interpretation.qc.warnings, warning] } };
  }
  const map = mapSecondRefractor(survey, interpretation);
  const v3 = map.velocitiesMPerS[2];
  if (!map.mapped || v3 === null) {
    const warnings = [...interpretation.qc.warnings, ...map.warnings];
    return { ...interpretation, qc: { ...interpretation.qc, warnings } };
  }
  const stations = interpretation.stations.map((s, i) => {
    const [z1, z2] = map.depthM[i];
    if (z1 === null) return { ...s, depths: [s.depth, null] };
    const d1 = map.first.delayTimeMs[i];
    return {
      ...s,
      depth: roundTo(z1, 2),
      refractorElevation: roundTo(s.elevation - z1, 2),
      delayTime: isNum(d1) ? roundTo(d1, 2) : s.delayTime,
      depths: [roundTo(z1, 2), roundTo(z2, 2)],
      delaySources: [map.first.delaySource[i] ?? (s.depth !== null ? 'pair' : null), map.second.delaySource[i]],
    };
  });
  const filled = (x: number | undefined): boolean => stations.some((s) => s.x === x && s.depths[0] !== null);
  // Notes of the two-layer section that this map answers: its first-refractor gaps, and
  // "no pair / too few picks for V2" (this map has its own delays and V2 from the lines).
  const answered = new Set(['second-refractor-not-mapped', 'no-opposing-pair', 'few-refracted-picks']);
  const kept = interpretation.qc.warnings.filter((w) => !answered.has(w.code) && !(w.code === 'no-coverage' && filled(w.x)));
  const gaps = stations.filter((s) => s.depths[1] === null).map((s) => s.x);
  if (gaps.length > 0) {
    map.warnings.push({
      code: 'second-refractor-no-coverage',
      message: `No depth to the second refractor at ${describeXs(gaps)}: no branch-2 arrival reaches there, or the first refractor's depth is missing.`,
      x: gaps[0],
    });
  }
  const layers = [interpretation.layers[0], { velocity: Math.round(map.velocitiesMPerS[1] as number) }, { velocity: Math.round(v3) }];
  return { ...interpretation, stations, layers, qc: { ...interpretation.qc, warnings: [...kept, ...map.warnings] } };
}

/**
 * Fills gaps of `values` at indices where `wanted`: linear interpolation in x between the
 * nearest values on both sides; beyond the outermost value, that value held (no slope is
 * extrapolated).
 */
function fillGaps(xs: number[], values: (number | null)[], wanted: (i: number) => boolean): { values: (number | null)[]; filled: boolean[] } {
  const out = [...values];
  const filled = values.map(() => false);
  for (let i = 0; i < values.length; i++) {
    if (values[i] !== null || !wanted(i)) continue;
    let a = i - 1;
    while (a >= 0 && values[a] === null) a--;
    let b = i + 1;
    while (b < values.length && values[b] === null) b++;
    if (a < 0 && b >= values.length) continue;
    if (a < 0) out[i] = values[b];
    else if (b >= values.length) out[i] = values[a];
    else {
      const va = values[a] as number;
      const vb = values[b] as number;
      out[i] = va + ((vb - va) * (xs[i] - xs[a])) / (xs[b] - xs[a]);
    }
    filled[i] = true;
  }
  return { values: out, filled };
}

function positive(v: number | null | undefined): number | null {
  return isNum(v) && v > 0 ? v : null;
}

function roundTo(v: number | null, decimals: number): number | null {
  if (!isNum(v)) return null;
  const f = 10 ** decimals;
  const r = Math.round(v * f) / f;
  return r === 0 ? 0 : r;
}

function describeXs(xs: number[]): string {
  const f = (v: number): string => String(Math.round(v * 100) / 100);
  if (xs.length > 6) return `x = ${f(xs[0])}–${f(xs[xs.length - 1])} m (${xs.length} geophones)`;
  return xs.length === 1 ? `x = ${f(xs[0])} m` : `x = ${xs.map(f).join(', ')} m`;
}
