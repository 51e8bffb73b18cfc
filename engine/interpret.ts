/**
 * Interprets one refraction line by the plus-minus method (Hagedoorn, Geophysical
 * Prospecting 7, 1959): branches → V1 → opposing pairs and slope-intercept velocities →
 * reciprocal check → phantoming → plus and minus times under every geophone → V2 from the
 * minus times → normal depths → vertical depths from the envelope of depth arcs.
 *
 * Deterministic and pure. The survey must already be valid (validateSurvey). Nothing is
 * rounded on the way; the output's own numbers are rounded once, in `OUTPUT_DECIMALS`.
 *
 * Choices (documented in .notes/readme-plus-minus.md):
 *  - T+ at a geophone is the plain mean over the opposing pairs that cover it; pairs whose
 *    reciprocal check fails are used only where no passing pair reaches;
 *  - V2 is fitted to T− first against x, then (twice) against distance along the
 *    refractor between the feet of the depth arcs, which removes the 1/cos(dip) bias;
 *  - the dip is the slope of a line through the refractor elevations when they fit it
 *    within the pick noise, else null.
 * Assumptions:
 *  - two layers for the depth section: the first refractor (branch 1) only;
 *  - one V1 and one V2 for the whole line (lateral changes come from the structure work);
 *  - geophones sit on the ground at their elevations; the shots' own elevations and depths
 *    cancel out of T+ through the reciprocal time, so they need no correction.
 */
import { linearRegression } from 'simple-statistics';
import type { Survey } from './survey.js';
import type {
  Interpretation,
  OpposingPairVelocities,
  ReciprocalCheck,
  ShotAnalysis,
  Station,
  VelocityAnalysis,
  Warning,
} from './interpretation.js';
import { CAUTIONS } from './cautions.js';
import { assignBranches } from './branches/assign-branches.js';
import { topLayerVelocity } from './velocities/direct-velocity.js';
import { opposingPairs } from './velocities/opposing-pairs.js';
import { opposingPairVelocities } from './velocities/slope-intercept.js';
import { DEFAULT_RECIPROCAL_TOLERANCE_MS, reciprocalChecks } from './reciprocal.js';
import { phantomArrivals, type PhantomResult } from './phantom.js';
import { combinePlusTimes, normalDepthFromDelayM, plusMinus } from './plus-minus.js';
import { minusTimeVelocity, type MinusTimeVelocityResult } from './minus-time-velocity.js';
import { arcFootPointsM, verticalDepthsFromArcsM } from './depth-arcs.js';

/** Decimals kept in the output: 0.01 m, 0.01 ms, 1 m/s, 0.01°. The one place rounding is decided. */
export const OUTPUT_DECIMALS = { metres: 2, milliseconds: 2, velocity: 0, degrees: 2 } as const;

/** Default pick uncertainty, ms (SurveyOptions.pickUncertaintyMs). */
const DEFAULT_PICK_UNCERTAINTY_MS = 0.5;

/**
 * Phantoming is trusted while the end and off-end branches stay parallel within this many
 * pick uncertainties (RMS of their difference). Common practice: two standard deviations.
 */
const PHANTOM_PARALLEL_FACTOR = 2;

/** Refinements of V2 against distance along the refractor (each recomputes the arcs). */
const REFRACTOR_DISTANCE_PASSES = 2;

/** A planar dip is reported when refractor elevations fit a line within this many depth standard deviations (RMS). Common practice. */
const PLANAR_FIT_FACTOR = 2;

/** velocityAnalysis.minusTimeVelocity with the fields this method adds. */
interface MinusTimeVelocityOutput {
  velocity: number;
  standardError: number;
  count: number;
  /** 'along-refractor': T− fitted against distance between the feet of the depth arcs; 'along-line': against x. */
  distance: 'along-line' | 'along-refractor';
  /** V2 from T− against x alone, m/s (1/cos θ high over a refractor dipping θ). */
  alongLineVelocity?: number;
}

interface PairWork {
  left: ShotAnalysis;
  right: ShotAnalysis;
  reciprocalTimeMs: number;
  /** The pair's reciprocal times agree within the tolerance. */
  reciprocalOk: boolean;
  plusTimeMs: (number | null)[];
  minusTimeMs: (number | null)[];
  /** Geophones where either shot's time was phantomed. */
  phantomUsed: boolean[];
}

interface PhantomWork {
  shot: ShotAnalysis;
  side: 'left' | 'right';
  /** Off-end shots on that side that were tried; empty when there is none. */
  candidates: string[];
  from: ShotAnalysis | null;
  result: PhantomResult | null;
}

export function interpret(survey: Survey): Interpretation {
  const options = survey.options ?? {};
  const warnings: Warning[] = [];
  const geophoneX = survey.geophones.map((g) => g.x);
  const elevation = survey.geophones.map((g) => g.elevation ?? 0);
  const pickUncertaintyMs = positiveOr(options.pickUncertaintyMs, DEFAULT_PICK_UNCERTAINTY_MS);

  if (options.method && options.method !== 'plus-minus') {
    warnings.push({
      code: 'method-unavailable',
      message: `The ${options.method} method is not available yet; the line was interpreted by the plus-minus method.`,
    });
  }

  // 1. Branches and the top-layer velocity.
  const analysed = assignBranches(survey, options.layers ? { layers: options.layers } : undefined);
  const direct = topLayerVelocity(analysed, survey);
  const v1 = positiveOrNull(direct.velocity);
  if (v1 === null) {
    warnings.push({
      code: 'no-direct-velocity',
      message: 'No direct-wave branch was found on any shot, so the top-layer velocity V1 and all depths are unknown. Check that the shots near the spread have picks close to the shot.',
    });
  }

  const withSecond = analysed.filter((s) => s.branchOfPick.some((b) => b === 2)).map((s) => s.id);
  if (withSecond.length > 0) {
    warnings.push({
      code: 'second-refractor-not-mapped',
      message:
        `Arrivals of ${withSecond.join(', ')} were assigned to a second refractor. This section maps the first refractor only, ` +
        `so those arrivals give no plus times. If the line has two layers only, set the layer count to 2.`,
    });
  }

  // 2. Opposing pairs: slope-intercept velocities (needs V1) and the reciprocal check.
  const pairs = opposingPairs(analysed);
  const pairVelocities: OpposingPairVelocities[] = [];
  if (v1 !== null) {
    for (const [a, b] of pairs) {
      const pv = opposingPairVelocities(v1, a, b);
      if (pv) pairVelocities.push(pv);
    }
  }
  const toleranceMs = positiveOr(options.reciprocalToleranceMs, DEFAULT_RECIPROCAL_TOLERANCE_MS, true);
  const reciprocal = reciprocalChecks(survey, analysed, toleranceMs);
  warnings.push(...reciprocal.warnings);

  // 3. Phantoming of the end shots from the off-end shots on their side.
  const phantoms = phantomEndShots(survey, analysed);
  for (const p of phantoms) {
    if (p.result && p.result.parallelRmsMs > PHANTOM_PARALLEL_FACTOR * pickUncertaintyMs) {
      warnings.push({
        code: 'phantom-not-parallel',
        message:
          `Refracted arrivals of ${p.from!.id} and ${p.shot.id} are not parallel where both were recorded ` +
          `(RMS ${fmt(p.result.parallelRmsMs, 2)} ms about the ${fmt(p.result.shiftMs, 2)} ms shift): ` +
          `a step or a velocity change may lie between the two shots, and the phantomed times near ${p.shot.id} are doubtful.`,
        x: p.shot.x,
      });
    }
  }
  const shots: ShotAnalysis[] = analysed.map((s) => {
    const p = phantoms.find((w) => w.shot.id === s.id && w.result && w.result.phantomCount > 0);
    return {
      ...s,
      phantom:
        p && p.result && p.from
          ? {
              fromShot: p.from.id,
              shiftMs: roundMs(p.result.shiftMs),
              times: p.result.timesMs.map(roundMsOrNull),
              parallelRmsMs: roundMs(p.result.parallelRmsMs),
            }
          : null,
    };
  });

  // 4. Plus and minus times of every opposing pair.
  const pairWork: PairWork[] = [];
  for (const [a, b] of pairs) {
    const check = reciprocalCheckOf(reciprocal.checks, a.id, b.id);
    if (!check) continue; // reciprocalChecks has already said why
    const tAB = (check.forwardMs + check.reverseMs) / 2;
    const left = headWaveTimes(survey, a, 'right', phantoms);
    const right = headWaveTimes(survey, b, 'left', phantoms);
    const pm = plusMinus({
      leftShotXM: a.x,
      rightShotXM: b.x,
      geophoneXM: geophoneX,
      leftTimesMs: left.timesMs,
      rightTimesMs: right.timesMs,
      reciprocalTimeMs: tAB,
    });
    pairWork.push({
      left: a,
      right: b,
      reciprocalTimeMs: tAB,
      reciprocalOk: check.ok,
      ...pm,
      phantomUsed: geophoneX.map((_, i) => pm.plusTimeMs[i] !== null && (left.phantomed[i] || right.phantomed[i])),
    });
  }
  if (pairs.length === 0) {
    warnings.push({
      code: 'no-opposing-pair',
      message: 'No two shots record refracted arrivals toward each other over a common stretch of the line, so plus times (and depths) cannot be found. Shoot from both ends of the spread.',
    });
  }
  // Pairs whose reciprocal times agree are trusted; a pair that fails the check (a bad
  // pick or a branch read wrongly near a shot) is used only where no trusted pair reaches.
  const trustedPairs = pairWork.filter((p) => p.reciprocalOk);
  const fallbackPairs = pairWork.filter((p) => !p.reciprocalOk);
  const trustedPlus = combinePlusTimes(trustedPairs.map((p) => p.plusTimeMs), geophoneX.length);
  const fallbackPlus = combinePlusTimes(fallbackPairs.map((p) => p.plusTimeMs), geophoneX.length);
  const fromMisfitPairs = geophoneX.map((_, i) => trustedPlus.plusTimeMs[i] === null && fallbackPlus.plusTimeMs[i] !== null);
  const contributing = geophoneX.map((_, i) => (fromMisfitPairs[i] ? fallbackPairs : trustedPairs).filter((p) => p.plusTimeMs[i] !== null));
  const plusTimeMs = geophoneX.map((_, i) => (fromMisfitPairs[i] ? fallbackPlus.plusTimeMs[i] : trustedPlus.plusTimeMs[i]));
  const pairCount = contributing.map((c) => c.length);
  const misfitXs = geophoneX.filter((_, i) => fromMisfitPairs[i]);
  if (misfitXs.length > 0) {
    warnings.push({
      code: 'plus-time-from-misfit-pair',
      message: `At ${describeXs(misfitXs)} the only plus times come from shot pairs that fail the reciprocal check; the depths there are doubtful.`,
      x: misfitXs[0],
    });
  }

  // 5. V2 from the minus times (common slope over the pairs), first against distance along
  // the line; then, once the arcs give the feet of the perpendiculars, against distance
  // along the refractor, which removes the 1/cos(dip) bias of the first fit.
  const minusPairs = trustedPairs.length > 0 ? trustedPairs : fallbackPairs;
  const minusSeries = (abscissa: (i: number) => number | null) =>
    minusPairs.map((p) => {
      const idx = geophoneX.map((_, i) => i).filter((i) => p.minusTimeMs[i] !== null && abscissa(i) !== null);
      return { xM: idx.map((i) => abscissa(i) as number), minusTimeMs: idx.map((i) => p.minusTimeMs[i] as number) };
    });
  const alongLineFit = minusTimeVelocity(minusSeries((i) => geophoneX[i]));
  let v2 = velocityFromMinusFit(alongLineFit, v1, warnings, pairWork.length > 0);
  let minusFit: MinusTimeVelocityResult = alongLineFit;
  let minusDistance: 'along-line' | 'along-refractor' = 'along-line';

  // 6. Delay times, normal depths, vertical depths from the envelope of arcs.
  const delayTimeMs = plusTimeMs.map((t) => (t === null ? null : t / 2));
  let depthsNow = depthPass(geophoneX, elevation, delayTimeMs, v1, v2);
  for (let pass = 0; pass < REFRACTOR_DISTANCE_PASSES && v1 !== null && v2 !== null; pass++) {
    const s = distanceAlongRefractorM(depthsNow.feet);
    const refined = minusTimeVelocity(minusSeries((i) => s[i]));
    if (!refined.ok || !(refined.velocity > v1) || refined.count < alongLineFit.count) break;
    v2 = refined.velocity;
    minusFit = refined;
    minusDistance = 'along-refractor';
    depthsNow = depthPass(geophoneX, elevation, delayTimeMs, v1, v2);
  }
  const { normalDepthM, verticalDepthM } = depthsNow;
  const negative = geophoneX.filter((_, i) => delayTimeMs[i] !== null && (delayTimeMs[i] as number) < 0);
  if (negative.length > 0 && v1 !== null && v2 !== null) {
    warnings.push({
      code: 'negative-delay-time',
      message: `Negative delay time at ${describeXs(negative)}: the picks there disagree with the reciprocal time (a bad pick or a wrong branch); no depth is given there.`,
      x: negative[0],
    });
  }

  warnings.push(...coverageWarnings(survey, pairWork, phantoms, plusTimeMs));

  // 7. Stations.
  const widest = widestPairMinusTimes(pairWork, geophoneX.length);
  const stations: Station[] = survey.geophones.map((g, i) => {
    const depth = verticalDepthM[i];
    const coverage: Station['coverage'] =
      plusTimeMs[i] === null ? 'none' : contributing[i].some((p) => p.phantomUsed[i]) ? 'phantom' : 'pair';
    return {
      x: g.x,
      elevation: elevation[i],
      delayTime: roundMsOrNull(delayTimeMs[i]),
      depth: roundMOrNull(depth),
      refractorElevation: roundMOrNull(depth === null ? null : elevation[i] - depth),
      depths: [roundMOrNull(depth)],
      v1: roundVOrNull(v1),
      refractorVelocity: roundVOrNull(plusTimeMs[i] === null ? null : v2),
      normalDepth: roundMOrNull(normalDepthM[i]),
      plusTime: roundMsOrNull(plusTimeMs[i]),
      minusTime: roundMsOrNull(widest[i]),
      coverage,
      pairCount: pairCount[i],
    };
  });

  // 8. Velocities along the line, dip, and the velocity analysis.
  const coveredX = geophoneX.filter((_, i) => plusTimeMs[i] !== null);
  const refractorVelocity =
    v2 !== null && coveredX.length > 0
      ? [{ from: coveredX[0], to: coveredX[coveredX.length - 1], velocity: roundV(v2) }]
      : [];
  const layers = [v1, v2].filter((v): v is number => v !== null).map((v) => ({ velocity: roundV(v) }));
  if (v1 === null) layers.length = 0; // a V2 with no V1 above it is not a layer model

  const shotX = new Map(analysed.map((s) => [s.id, s.x]));
  const dip = planarDip(geophoneX, elevation, verticalDepthM, pairVelocities, shotX, v1, v2, pickUncertaintyMs);

  // Fields added to the contract's minusTimeVelocity: which distance T− was fitted against,
  // and the plain along-the-line velocity for comparison.
  const minusTimeVelocityOut: MinusTimeVelocityOutput | null = minusFit.ok
    ? {
        velocity: roundV(minusFit.velocity),
        standardError: roundV(minusFit.standardError),
        count: minusFit.count,
        distance: minusDistance,
        ...(alongLineFit.ok ? { alongLineVelocity: roundV(alongLineFit.velocity) } : {}),
      }
    : null;
  const velocityAnalysis: VelocityAnalysis = {
    v1: roundVOrNull(v1),
    directVelocities: direct.perSide.map((p) => ({ ...p, velocity: roundV(p.velocity) })),
    pairs: pairVelocities,
    minusTimeVelocity: minusTimeVelocityOut,
  };

  return {
    method: 'plus-minus',
    ...(survey.name !== undefined ? { name: survey.name } : {}),
    stations,
    layers,
    refractorVelocity,
    features: { steps: [], velocityChanges: [], dip },
    qc: { reciprocal: reciprocal.checks, warnings },
    shots,
    velocityAnalysis,
    cautions: [...CAUTIONS],
  };
}

// ---------------------------------------------------------------------------------------
// Pipeline pieces (private).

/**
 * The reciprocal check of a pair. Its reciprocal time tAB is the mean of the two readings
 * (each a pick at a geophone at the other shot or an extrapolation along the refracted
 * branch: the rule of engine/reciprocal.ts). Null when the check could not be made.
 */
function reciprocalCheckOf(checks: ReciprocalCheck[], a: string, b: string): ReciprocalCheck | null {
  const c = checks.find((k) => (k.shots[0] === a && k.shots[1] === b) || (k.shots[0] === b && k.shots[1] === a));
  if (!c || !Number.isFinite(c.forwardMs) || !Number.isFinite(c.reverseMs)) return null;
  return c;
}

/** Normal depths (arc radii) and vertical depths (envelope of arcs) for given V1, V2. */
function depthPass(
  xs: number[],
  elevation: number[],
  delayTimeMs: (number | null)[],
  v1: number | null,
  v2: number | null,
): { normalDepthM: (number | null)[]; verticalDepthM: (number | null)[]; feet: ReturnType<typeof arcFootPointsM> } {
  const normalDepthM = delayTimeMs.map((d) => {
    if (d === null || v1 === null || v2 === null) return null;
    const z = normalDepthFromDelayM(d, v1, v2);
    return z !== null && z >= 0 ? z : null;
  });
  const arcs = xs.map((x, i) => ({ xM: x, elevationM: elevation[i], normalDepthM: normalDepthM[i] }));
  return { normalDepthM, verticalDepthM: verticalDepthsFromArcsM(arcs), feet: arcFootPointsM(arcs) };
}

/**
 * Distance along the refractor to each geophone's foot, m, measured along the polyline
 * through the feet in line order (only differences matter). Null where there is no foot.
 * T− rises by 2/V2 per metre of this distance (Hagedoorn 1959), exactly so over a plane
 * whatever the dip and the ground slope; per metre along the line it rises by
 * 2·(cos θ − g·sin θ)/V2 for dip θ and ground gradient g.
 */
function distanceAlongRefractorM(feet: ({ xM: number; elevationM: number } | null)[]): (number | null)[] {
  let s = 0;
  let previous: { xM: number; elevationM: number } | null = null;
  return feet.map((f) => {
    if (f === null) return null;
    if (previous) s += Math.sign(f.xM - previous.xM || 1) * Math.hypot(f.xM - previous.xM, f.elevationM - previous.elevationM);
    previous = f;
    return s;
  });
}

function isNum(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

/** Picks of `shot` on `side` that belong to the first refractor, ms; null elsewhere. */
function refractedTimes(survey: Survey, shot: ShotAnalysis, side: 'left' | 'right'): (number | null)[] {
  const times = survey.shots.find((s) => s.id === shot.id)?.times ?? [];
  return survey.geophones.map((g, i) => {
    const t = times[i];
    const onSide = side === 'right' ? g.x > shot.x : g.x < shot.x;
    return onSide && shot.branchOfPick[i] === 1 && isNum(t) ? t : null;
  });
}

/** Head-wave times a shot contributes toward one side: its own refracted picks, else phantomed ones. */
function headWaveTimes(
  survey: Survey,
  shot: ShotAnalysis,
  side: 'left' | 'right',
  phantoms: PhantomWork[],
): { timesMs: (number | null)[]; phantomed: boolean[] } {
  const own = refractedTimes(survey, shot, side);
  const p = phantoms.find((w) => w.shot.id === shot.id && w.side === side)?.result;
  const phantomed = own.map((t, i) => t === null && !!p && p.timesMs[i] !== null);
  return { timesMs: own.map((t, i) => (t !== null ? t : phantomed[i] ? p!.timesMs[i] : null)), phantomed };
}

/**
 * For each end shot, phantoms its missing refracted arrivals (on the side facing the
 * spread) from an off-end shot on the same side: of the candidates that share enough
 * refracted arrivals, the one that fills most geophones, then the nearest.
 */
function phantomEndShots(survey: Survey, shots: ShotAnalysis[]): PhantomWork[] {
  const work: PhantomWork[] = [];
  for (const shot of shots) {
    if (shot.position !== 'end-left' && shot.position !== 'end-right') continue;
    const side = shot.position === 'end-left' ? 'right' : 'left';
    const offEnd = shots
      .filter((s) => s.position === (side === 'right' ? 'off-end-left' : 'off-end-right'))
      .sort((p, q) => Math.abs(p.x - shot.x) - Math.abs(q.x - shot.x));
    const target = refractedTimes(survey, shot, side);
    const eligible = survey.geophones.map((g) => (side === 'right' ? g.x > shot.x : g.x < shot.x));
    let best: { from: ShotAnalysis; result: PhantomResult } | null = null;
    for (const from of offEnd) {
      const result = phantomArrivals({ targetRefractedMs: target, sourceRefractedMs: refractedTimes(survey, from, side), eligible });
      if (result && (!best || result.phantomCount > best.result.phantomCount)) best = { from, result };
    }
    work.push({ shot, side, candidates: offEnd.map((s) => s.id), from: best?.from ?? null, result: best?.result ?? null });
  }
  return work;
}

function velocityFromMinusFit(
  fit: MinusTimeVelocityResult,
  v1: number | null,
  warnings: Warning[],
  anyPair: boolean,
): number | null {
  if (!fit.ok) {
    if (anyPair) {
      warnings.push(
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
    return null;
  }
  if (v1 !== null && !(fit.velocity > v1)) {
    warnings.push({
      code: 'v2-not-above-v1',
      message: `The refractor velocity from the minus times (${Math.round(fit.velocity)} m/s) is not above the top-layer velocity (${Math.round(v1)} m/s): no head wave could come from such a layer, so no depths are given. Check the branch assignment.`,
    });
    return null;
  }
  return fit.velocity;
}

/** T− of the widest pair covering each geophone (pairs' minus times differ by a constant). */
function widestPairMinusTimes(pairs: PairWork[], n: number): (number | null)[] {
  const byWidth = [...pairs].sort((p, q) => q.right.x - q.left.x - (p.right.x - p.left.x));
  return Array.from({ length: n }, (_, i) => byWidth.find((p) => p.minusTimeMs[i] !== null)?.minusTimeMs[i] ?? null);
}

/**
 * Planar dip, degrees (positive where the refractor deepens toward +x).
 * From a least-squares line through the refractor elevations when they fit it within
 * PLANAR_FIT_FACTOR depth standard deviations (σ_z from the pick uncertainty: T+ sums
 * three picks, so σ_delay = σ_pick·√3/2, σ_z = σ_delay·V1/cos ic); null when they do not
 * (no single planar dip describes the refractor). With fewer than three depths, the
 * slope-intercept dip of the outermost opposing pair, if any.
 */
function planarDip(
  xs: number[],
  elevation: number[],
  depth: (number | null)[],
  pairs: OpposingPairVelocities[],
  shotX: Map<string, number>,
  v1: number | null,
  v2: number | null,
  pickUncertaintyMs: number,
): Interpretation['features']['dip'] {
  const points: [number, number][] = [];
  depth.forEach((d, i) => {
    if (d !== null) points.push([xs[i], elevation[i] - d]);
  });
  const outermost = outermostPair(pairs, shotX);
  const slopeInterceptDegrees = outermost ? roundDeg(outermost.dipDegrees) : null;
  if (points.length >= 3 && v1 !== null && v2 !== null && points[points.length - 1][0] > points[0][0]) {
    const { m, b } = linearRegression(points);
    const rmsM = Math.sqrt(points.reduce((s, [x, y]) => s + (y - (m * x + b)) ** 2, 0) / points.length);
    const sigmaDepthM = (((pickUncertaintyMs * Math.sqrt(3)) / 2 / 1000) * v1 * v2) / Math.sqrt(v2 * v2 - v1 * v1);
    if (!(rmsM <= PLANAR_FIT_FACTOR * sigmaDepthM)) return null;
    const degrees = (Math.atan(-m) * 180) / Math.PI;
    return {
      degrees: roundDeg(degrees),
      source: 'refractor-elevations',
      rmsM: roundM(rmsM),
      ...(slopeInterceptDegrees !== null ? { slopeInterceptDegrees, slopeInterceptShots: outermost!.shots } : {}),
    };
  }
  if (outermost && Number.isFinite(outermost.dipDegrees)) {
    return { degrees: roundDeg(outermost.dipDegrees), source: 'slope-intercept', slopeInterceptShots: outermost.shots };
  }
  return null;
}

/** The slope-intercept result of the pair whose shots lie furthest apart. */
function outermostPair(pairs: OpposingPairVelocities[], shotX: Map<string, number>): OpposingPairVelocities | null {
  const width = (p: OpposingPairVelocities): number => (shotX.get(p.shots[1]) ?? 0) - (shotX.get(p.shots[0]) ?? 0);
  return pairs.reduce<OpposingPairVelocities | null>((best, p) => (!best || width(p) > width(best) ? p : best), null);
}

/**
 * One "no-coverage" warning per run of neighbouring geophones that got no plus time for
 * the same reason, e.g. "geophones at x = 0–6 m: only direct arrivals from W-end and no
 * off-end shot on that side to phantom from".
 */
function coverageWarnings(
  survey: Survey,
  pairs: PairWork[],
  phantoms: PhantomWork[],
  plusTimeMs: (number | null)[],
): Warning[] {
  const reasons = survey.geophones.map((g, i) =>
    plusTimeMs[i] !== null ? null : noCoverageReason(survey, pairs, phantoms, i),
  );
  const warnings: Warning[] = [];
  let start = 0;
  for (let i = 1; i <= reasons.length; i++) {
    if (i < reasons.length && reasons[i] === reasons[start]) continue;
    const reason = reasons[start];
    if (reason !== null) {
      const from = survey.geophones[start].x;
      const to = survey.geophones[i - 1].x;
      const where = i - 1 === start ? `geophone at x = ${fmtX(from)} m` : `geophones at x = ${fmtX(from)}–${fmtX(to)} m`;
      warnings.push({ code: 'no-coverage', message: `No delay time or depth at ${where}: ${reason}.`, x: from });
    }
    start = i;
  }
  return warnings;
}

function noCoverageReason(
  survey: Survey,
  pairs: PairWork[],
  phantoms: PhantomWork[],
  i: number,
): string {
  const x = survey.geophones[i].x;
  if (pairs.length === 0) return 'no opposing pair of shots records refracted arrivals toward each other';
  const bracketing = pairs.filter((p) => p.left.x < x && x < p.right.x).sort((p, q) => q.right.x - q.left.x - (p.right.x - p.left.x));
  if (bracketing.length === 0) {
    const hasLeft = pairs.some((p) => p.left.x < x);
    return hasLeft ? 'no shot beyond it on the right records refracted arrivals toward it' : 'no shot beyond it on the left records refracted arrivals toward it';
  }
  const pair = bracketing[0];
  const parts: string[] = [];
  for (const [shot, side] of [
    [pair.left, 'right'],
    [pair.right, 'left'],
  ] as const) {
    const own = refractedTimes(survey, shot, side)[i];
    const phantom = phantoms.find((w) => w.shot.id === shot.id && w.side === side);
    if (own !== null || (phantom?.result && phantom.result.timesMs[i] !== null)) continue;
    const branch = shot.branchOfPick[i];
    const what =
      branch === null
        ? `no pick from ${shot.id}`
        : branch === 0
          ? `only direct arrivals from ${shot.id}`
          : `arrivals from ${shot.id} belong to the second refractor`;
    let why = '';
    if (phantom) {
      if (phantom.candidates.length === 0) why = ' and no off-end shot on that side to phantom from';
      else if (!phantom.result) why = ` and too few common refracted arrivals with ${phantom.candidates.join(', ')} to phantom from`;
      else why = ` and ${phantom.from!.id} has no refracted arrival there to phantom from`;
    }
    parts.push(what + why);
  }
  return parts.length > 0 ? parts.join('; ') : `no pair of opposing shots gives both arrivals there`;
}

// ---------------------------------------------------------------------------------------
// Output precision: the one place where numbers are rounded.

function roundTo(value: number, decimals: number): number {
  const f = 10 ** decimals;
  const r = Math.round(value * f) / f;
  return r === 0 ? 0 : r; // never −0
}
const roundM = (v: number): number => roundTo(v, OUTPUT_DECIMALS.metres);
const roundMs = (v: number): number => roundTo(v, OUTPUT_DECIMALS.milliseconds);
const roundV = (v: number): number => roundTo(v, OUTPUT_DECIMALS.velocity);
const roundDeg = (v: number): number => roundTo(v, OUTPUT_DECIMALS.degrees);
const orNull =
  (f: (v: number) => number) =>
  (v: number | null | undefined): number | null =>
    isNum(v) ? f(v) : null;
const roundMOrNull = orNull(roundM);
const roundMsOrNull = orNull(roundMs);
const roundVOrNull = orNull(roundV);

function positiveOr(value: number | undefined, fallback: number, allowZero = false): number {
  return isNum(value) && (value > 0 || (allowZero && value === 0)) ? value : fallback;
}
function positiveOrNull(value: number | null): number | null {
  return isNum(value) && value > 0 ? value : null;
}
function fmt(v: number, decimals: number): string {
  return v.toFixed(decimals);
}
function fmtX(v: number): string {
  return String(roundTo(v, 2));
}
function describeXs(xs: number[]): string {
  return xs.length === 1 ? `x = ${fmtX(xs[0])} m` : `x = ${xs.map(fmtX).join(', ')} m`;
}
