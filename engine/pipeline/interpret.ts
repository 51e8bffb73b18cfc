/**
 * Interprets one refraction line by the plus-minus method (Hagedoorn, Geophysical
 * Prospecting 7, 1959): branches → V1 → opposing pairs and slope-intercept velocities →
 * reciprocal check → phantoming → plus and minus times under every geophone → steps,
 * lateral V1 and V2 (structure-features.ts, lateral-v1.ts) → normal depths → vertical
 * depths from the envelope of depth arcs.
 *
 * Deterministic and pure. The survey must already be valid (validateSurvey). Nothing is
 * rounded on the way; the output's own numbers are rounded once, in `OUTPUT_DECIMALS`.
 *
 * Choices (documented in README.md, "What Arcline computes", and docs/developers/plus-minus.md):
 *  - T+ at a geophone is the inverse-variance weighted mean over every opposing pair that
 *    covers it; pairs whose reciprocal check fails are used only where no passing pair
 *    reaches; extrapolated reciprocal times are re-read from the nearest picks;
 *  - end shots are phantomed from every off-end shot whose branch is parallel to theirs;
 *  - steps from the delay times and the branches, lateral V2 from T− (step and bend zones
 *    masked), V2 per segment fitted against x, then (twice) against distance along the
 *    refractor between the feet of the depth arcs, which removes the 1/cos(dip) bias;
 *  - V1 along the line when the shots' direct branches disagree beyond their noise;
 *  - the dip is the slope of a line through the refractor elevations when they fit it
 *    within the pick noise, else null; local dips per piece between steps and changes.
 * Assumptions:
 *  - two layers for the depth section: the first refractor (branch 1) only;
 *  - geophones sit on the ground at their elevations; the shots' own elevations and depths
 *    cancel out of T+ through the reciprocal time, so they need no correction.
 */
import { linearRegression } from 'simple-statistics';
import type { Survey } from '../survey/survey.js';
import type {
  BranchLine,
  Interpretation,
  OpposingPairVelocities,
  ReciprocalCheck,
  ShotAnalysis,
  SideBranches,
  Station,
  VelocityAnalysis,
  Warning,
} from '../output/interpretation.js';
import { CAUTIONS } from '../qc/cautions.js';
import { assignBranches } from '../branches/assign-branches.js';
import { topLayerVelocity } from '../velocities/direct-velocity.js';
import { theilSenSlope } from '../velocities/theil-sen.js';
import { opposingPairs } from '../velocities/opposing-pairs.js';
import { opposingPairVelocities } from '../velocities/slope-intercept.js';
import { DEFAULT_RECIPROCAL_TOLERANCE_MS, reciprocalChecks } from '../reciprocal/reciprocal-checks.js';
import { adjustReciprocalTimes } from '../reciprocal/reciprocal-adjustment.js';
import { reciprocalTimeOf } from '../plus-minus/weighted-plus-times.js';
import { mergePhantoms, phantomArrivals, type PhantomResult } from '../plus-minus/phantom.js';
import { combineMinusTimes, combineWeighted, normalDepthFromDelayM, plusMinus } from '../plus-minus/plus-minus.js';
import type { MinusTimeVelocityResult } from '../velocities/minus-time-velocity.js';
import { arcFootPointsM, verticalDepthsFromArcsM } from '../depth/depth-arcs.js';
import { withResiduals } from '../qc/residuals.js';
import { withSecondRefractor } from '../depth/second-refractor.js';
import { withDataCautions } from '../qc/data-cautions.js';
import { chiSquareQuantile } from '../structure/quantiles.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { localTopLayerVelocities, slownessStandardError, type DirectSide } from '../velocities/lateral-v1.js';
import {
  bendZones,
  findSteps,
  mergeZones,
  lateralRefractorVelocity,
  localRefractorVelocities,
  refractorDips,
  segmentIndexAt,
  segmentMinusVelocity,
  stepZones,
  type FoundStep,
  type RefractedBranch,
  type RefractorVelocitySegment,
} from '../structure/structure-features.js';

/** Decimals kept in the output: 0.01 m, 0.01 ms, 1 m/s, 0.01°. The one place rounding is decided. */
export const OUTPUT_DECIMALS = { metres: 2, milliseconds: 2, velocity: 0, degrees: 2 } as const;

/** Default pick uncertainty, ms (SurveyOptions.pickUncertaintyMs). */
const DEFAULT_PICK_UNCERTAINTY_MS = 0.5;

/**
 * Phantoming is trusted while the end and off-end branches stay parallel within this many
 * pick uncertainties (RMS of their difference). Common practice: two standard deviations.
 */
const PHANTOM_PARALLEL_FACTOR = 2;

/**
 * A direct pick further than this many pick uncertainties from the line through the
 * nearer direct picks ends a shot side's direct run (the line predicted from a few noisy
 * picks is itself uncertain, so more than the usual 3σ). Common practice.
 */
const RUN_BREAK_SIGMAS = 4;

/** Smallest relative difference of neighbouring refractor velocities kept as a change. Common practice (as engine/structure/velocity-changes.ts). */
const MIN_SEGMENT_CHANGE = 0.05;

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
  /** The pair's reciprocal times agree within the tolerance (or the pair was tied to one that does). */
  reciprocalOk: boolean;
  /** Variance of reciprocalTimeMs, ms². */
  reciprocalVarianceMs2: number;
  plusTimeMs: (number | null)[];
  minusTimeMs: (number | null)[];
  /** Geophones where either shot's time was phantomed. */
  phantomUsed: boolean[];
  /** Variance of T+ and of T− at each geophone, ms² (null where the pair gives none). */
  plusVarianceMs2: (number | null)[];
  minusVarianceMs2: (number | null)[];
}

interface PhantomWork {
  shot: ShotAnalysis;
  side: 'left' | 'right';
  /** Off-end shots on that side that were tried; empty when there is none. */
  candidates: string[];
  /** Main source: of the accepted candidates the one that fills most geophones, then the nearest. */
  from: ShotAnalysis | null;
  /** Merged phantom of every accepted candidate (shift and RMS those of the main source). */
  result: PhantomResult | null;
  /** Variance of each merged phantom time, ms². */
  varianceMs2: (number | null)[];
  /** Every candidate that shared enough refracted arrivals, with its parallelism check. */
  tried: { from: ShotAnalysis; result: PhantomResult; parallel: boolean; used: boolean }[];
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
  const phantoms = phantomEndShots(survey, analysed, pickUncertaintyMs);
  for (const p of phantoms) {
    for (const t of p.tried) {
      if (t.parallel) continue;
      warnings.push({
        code: 'phantom-not-parallel',
        message:
          `Refracted arrivals of ${t.from.id} and ${p.shot.id} are not parallel where both were recorded ` +
          `(RMS ${fmt(t.result.parallelRmsMs, 2)} ms about the ${fmt(t.result.shiftMs, 2)} ms shift, limit ` +
          `${fmt(PHANTOM_PARALLEL_FACTOR * pickUncertaintyMs, 2)} ms). A vertical jump in the off-end branch of ${t.from.id} ` +
          `(two parallel pieces offset in time) points to a step in the refractor; a change of slope to a change of refractor velocity. ` +
          (t.used
            ? `No parallel off-end shot was found, so ${t.from.id} was used anyway and the phantomed times near ${p.shot.id} are doubtful.`
            : `${t.from.id} was not used to phantom ${p.shot.id}.`),
        x: p.shot.x,
      });
    }
  }
  const shots: ShotAnalysis[] = analysed.map((s) => {
    const p = phantoms.find((w) => w.shot.id === s.id && w.result && w.result.phantomCount > 0);
    // Added fields: every source used, and the parallelism check of every candidate.
    const phantom =
      p && p.result && p.from
        ? {
            fromShot: p.from.id,
            shiftMs: roundMs(p.result.shiftMs),
            times: p.result.timesMs.map(roundMsOrNull),
            parallelRmsMs: roundMs(p.result.parallelRmsMs),
            fromShots: p.tried.filter((t) => t.used).map((t) => t.from.id),
            checks: p.tried.map((t) => ({
              fromShot: t.from.id,
              shiftMs: roundMs(t.result.shiftMs),
              parallelRmsMs: roundMs(t.result.parallelRmsMs),
              overlapCount: t.result.overlapCount,
              parallel: t.parallel,
              used: t.used,
            })),
          }
        : null;
    return { ...s, phantom };
  });

  // 4. Plus and minus times of every opposing pair.
  const pairWork: PairWork[] = [];
  for (const [a, b] of pairs) {
    const check = reciprocalCheckOf(reciprocal.checks, a.id, b.id);
    if (!check) continue; // reciprocalChecks has already said why
    const tAB = (check.forwardMs + check.reverseMs) / 2;
    const left = headWaveTimes(survey, a, 'right', phantoms, pickUncertaintyMs);
    const right = headWaveTimes(survey, b, 'left', phantoms, pickUncertaintyMs);
    const reciprocalVariance = reciprocalVarianceMs2(check, pickUncertaintyMs, geophoneSpacingM(survey.geophones));
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
      // The check already widens its tolerance for long extrapolations (reciprocal.ts).
      reciprocalOk: check.ok,
      reciprocalVarianceMs2: reciprocalVariance,
      ...pm,
      phantomUsed: geophoneX.map((_, i) => pm.plusTimeMs[i] !== null && (left.phantomed[i] || right.phantomed[i])),
      minusVarianceMs2: geophoneX.map((_, i) =>
        pm.minusTimeMs[i] === null ? null : (left.varianceMs2[i] ?? 0) + (right.varianceMs2[i] ?? 0),
      ),
      plusVarianceMs2: geophoneX.map((_, i) =>
        pm.plusTimeMs[i] === null ? null : (left.varianceMs2[i] ?? 0) + (right.varianceMs2[i] ?? 0) + reciprocalVariance,
      ),
    });
  }
  adjustReciprocalTimes(pairWork.filter((p) => p.reciprocalOk));
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
  // Each geophone's T+ is the inverse-variance weighted mean over the pairs covering it.
  const weighted = (ps: PairWork[]) => combineWeighted(ps.map((p) => p.plusTimeMs), ps.map((p) => p.plusVarianceMs2), geophoneX.length);
  const trustedPlus = weighted(trustedPairs);
  const fallbackPlus = weighted(fallbackPairs);
  const fromMisfitPairs = geophoneX.map((_, i) => trustedPlus.valueMs[i] === null && fallbackPlus.valueMs[i] !== null);
  const contributing = geophoneX.map((_, i) => (fromMisfitPairs[i] ? fallbackPairs : trustedPairs).filter((p) => p.plusTimeMs[i] !== null));
  const plusTimeMs = geophoneX.map((_, i) => (fromMisfitPairs[i] ? fallbackPlus.valueMs[i] : trustedPlus.valueMs[i]));
  const plusSigmaMs = geophoneX.map((_, i) => (fromMisfitPairs[i] ? fallbackPlus.sigmaMs[i] : trustedPlus.sigmaMs[i]));
  warnings.push(...pairDisagreementWarnings(geophoneX, trustedPlus));
  const pairCount = contributing.map((c) => c.length);
  const misfitXs = geophoneX.filter((_, i) => fromMisfitPairs[i]);
  if (misfitXs.length > 0) {
    warnings.push({
      code: 'plus-time-from-misfit-pair',
      message: `At ${describeXs(misfitXs)} the only plus times come from shot pairs that fail the reciprocal check; the depths there are doubtful.`,
      x: misfitXs[0],
    });
  }

  // 5. The line V2 from the minus times of every pair (common slope), against x: the
  // reference for the structure search.
  const minusPairs = trustedPairs.length > 0 ? trustedPairs : fallbackPairs;
  const pairMinus = minusPairs.map((p) => p.minusTimeMs);
  const alongLineFit = segmentMinusVelocity(pairMinus, geophoneX, geophoneX.map(() => true));
  const lineV2 = velocityFromMinusFit(alongLineFit, v1, warnings, pairWork.length > 0);

  // 6. V1 along the line from the direct branch of every shot side (one value unless they differ).
  const topLayer = localTopLayerVelocities(geophoneX, directSides(survey, analysed, pickUncertaintyMs), v1);
  const v1At = topLayer.v1MPerS;

  // 7. Delay times; steps from the delay times and from every shot's refracted branches,
  // with first-pass depths (local V1, line V2).
  const delayTimeMs = plusTimeMs.map((t) => (t === null ? null : t / 2));
  const canSearch = v1 !== null && lineV2 !== null;
  const branches = refractedBranches(survey, analysed);
  const stepSearch = (normalDepthM: (number | null)[]): FoundStep[] =>
    canSearch
      ? findSteps({ xM: geophoneX, delayTimeMs, normalDepthM, groundElevationM: elevation, referenceV1MPerS: v1, referenceV2MPerS: lineV2, pickSigmaMs: pickUncertaintyMs, branches })
      : [];
  const firstPass = depthPass(geophoneX, elevation, delayTimeMs, v1At, geophoneX.map(() => lineV2));
  const firstSteps = stepSearch(firstPass.normalDepthM);
  // Zones where T− is not straight over a uniform refractor: around steps and sharp bends.
  const firstElevations = firstPass.verticalDepthM.map((d, i) => (d === null ? null : elevation[i] - d));
  const firstSigmasM = geophoneX.map((_, i) => depthSigmaM(plusSigmaMs[i], v1At[i], lineV2)).filter(isNum);
  const zones = canSearch
    ? mergeZones([
        ...stepZones(firstSteps, geophoneX, firstPass.normalDepthM, v1, lineV2),
        ...bendZones(geophoneX, firstElevations, firstPass.normalDepthM, v1, lineV2, medianOf(firstSigmasM) ?? 0),
      ])
    : [];
  const inStepZone = geophoneX.map((x) => zones.some((z) => x >= z.from && x <= z.to));

  // 8. Lateral V2: hinges in the combined T− (step zones masked); then V2 per segment from
  // every pair's T−, first against x, then (twice) against distance along the refractor
  // between the feet of the depth arcs, which removes the 1/cos(dip) bias.
  const combinedMinus = combineMinusTimes(pairMinus, minusPairs.map((p) => p.minusVarianceMs2), geophoneX.length);
  // Noise of the combined T−: pairs share shots, so averaging K pairs does not divide the
  // noise by √K. With nF distinct forward and nR distinct reverse shots at a geophone,
  // σ_T− = σ·√(1/nF + 1/nR); the median over the line, in the detector's per-pick units (/√2).
  const minusSigmas = geophoneX
    .map((_, i) => {
      const forward = new Set(minusPairs.filter((p) => p.minusTimeMs[i] !== null).map((p) => p.left.id)).size;
      const reverse = new Set(minusPairs.filter((p) => p.minusTimeMs[i] !== null).map((p) => p.right.id)).size;
      return forward > 0 && reverse > 0 ? pickUncertaintyMs * Math.sqrt(1 / forward + 1 / reverse) : null;
    })
    .filter((v): v is number => v !== null)
    .sort((p, q) => p - q);
  const lateral = canSearch && minusSigmas.length > 0
    ? lateralRefractorVelocity(geophoneX, combinedMinus.valueMs, zones, minusSigmas[minusSigmas.length >> 1] / Math.SQRT2)
    : { segments: [], changes: [], noiseSigmaMs: 0 };
  const spacingM = geophoneSpacingM(survey.geophones);
  const nearChange = geophoneX.map((x, i) => {
    const z = firstPass.normalDepthM[i] ?? 0;
    const reach = canSearch ? z * Math.tan(Math.asin(v1 / lateral.changes.reduce((m, c) => Math.min(m, c.left, c.right), lineV2))) : 0;
    return lateral.changes.some((c) => Math.abs(x - c.x) <= reach + spacingM / 2);
  });
  const segments: RefractorVelocitySegment[] =
    lateral.changes.length > 0 ? lateral.segments.map((g) => ({ ...g })) : lineV2 !== null ? [{ from: -Infinity, to: Infinity, velocity: lineV2, standardError: alongLineFit.ok ? alongLineFit.standardError : 0 }] : [];
  const useOf = () => segments.map((_, k) => geophoneX.map((x, i) => segmentIndexAt(segments, x) === k && !inStepZone[i] && !nearChange[i]));
  let segmentUse = useOf();
  let segmentFits: (MinusTimeVelocityResult | null)[] = segments.map(() => null);
  const fitSegments = (abscissa: (number | null)[], minCount: number[] | null): boolean => {
    let changed = false;
    segments.forEach((seg, k) => {
      const fit = segmentMinusVelocity(pairMinus, abscissa, segmentUse[k]);
      if (!fit.ok || v1 === null || !(fit.velocity > Math.max(v1, ...v1At.filter(isNum)))) return;
      if (minCount && fit.count < minCount[k]) return;
      seg.velocity = fit.velocity;
      seg.standardError = fit.standardError;
      segmentFits[k] = fit;
      changed = true;
    });
    return changed;
  };
  // Neighbouring segments whose refitted velocities differ by less than MIN_SEGMENT_CHANGE
  // are one segment (the detector's own 5 % rule, applied to the refitted velocities).
  const mergeSimilar = (abscissa: (number | null)[]): void => {
  for (;;) {
    let weakest = -1;
    let smallest = Infinity;
    for (let k = 0; k + 1 < segments.length; k++) {
      const a = segments[k].velocity;
      const b = segments[k + 1].velocity;
      const relative = Math.abs(a - b) / Math.min(a, b);
      if (relative < MIN_SEGMENT_CHANGE && relative < smallest) {
        smallest = relative;
        weakest = k;
      }
    }
    if (weakest < 0) break;
    segments.splice(weakest, 2, { ...segments[weakest], to: segments[weakest + 1].to });
    lateral.changes.splice(weakest, 1);
    if (segments.length === 1) Object.assign(segments[0], { from: -Infinity, to: Infinity });
    segmentUse = useOf();
    segmentFits = segments.map(() => null);
    fitSegments(abscissa, null);
  }
  };
  fitSegments(geophoneX, null);
  mergeSimilar(geophoneX);
  let alongLineCounts = segmentFits.map((f) => (f && f.ok ? f.count : 0));
  let alongLineVelocities = segments.map((g) => g.velocity);
  const v2AtFor = (normalDepthM: (number | null)[]) => localRefractorVelocities(geophoneX, segments, normalDepthM, v1At);
  let v2At = v2AtFor(firstPass.normalDepthM);
  let depthsNow = depthPass(geophoneX, elevation, delayTimeMs, v1At, v2At);
  let minusDistance: 'along-line' | 'along-refractor' = 'along-line';
  const stepXs = firstSteps.map((st) => st.x);
  for (let pass = 0; pass < REFRACTOR_DISTANCE_PASSES && canSearch; pass++) {
    const alongRefractor = distanceAlongRefractorM(depthsNow.feet, geophoneX, stepXs);
    if (!fitSegments(alongRefractor, alongLineCounts)) break;
    const count = segments.length;
    mergeSimilar(geophoneX);
    if (segments.length !== count) {
      alongLineCounts = segmentFits.map((f) => (f && f.ok ? f.count : 0));
      alongLineVelocities = segments.map((g) => g.velocity);
      fitSegments(alongRefractor, alongLineCounts);
    }
    minusDistance = 'along-refractor';
    v2At = v2AtFor(depthsNow.normalDepthM);
    depthsNow = depthPass(geophoneX, elevation, delayTimeMs, v1At, v2At);
  }
  const { normalDepthM, verticalDepthM } = depthsNow;
  const steps = stepSearch(normalDepthM);
  // One V2 for the layer list: the slowness mean over the covered length.
  const v2 = lineVelocity(segments, geophoneX.filter((_, i) => plusTimeMs[i] !== null)) ?? lineV2;
  const minusFit: MinusTimeVelocityResult = segments.length === 1 && segmentFits[0] ? segmentFits[0] : alongLineFit;
  if (segments.length !== 1) minusDistance = 'along-line';
  const negative = geophoneX.filter((_, i) => delayTimeMs[i] !== null && (delayTimeMs[i] as number) < 0);
  if (negative.length > 0 && v1 !== null && v2 !== null) {
    warnings.push({
      code: 'negative-delay-time',
      message: `Negative delay time at ${describeXs(negative)}: the picks there disagree with the reciprocal time (a bad pick or a wrong branch); no depth is given there.`,
      x: negative[0],
    });
  }

  warnings.push(...coverageWarnings(survey, pairWork, phantoms, plusTimeMs));
  const finalChanges = lateral.changes.map((c, k) => ({ x: c.x, left: segments[k].velocity, right: segments[k + 1].velocity }));
  warnings.push(...structureWarnings(steps, finalChanges, topLayer.lateral));

  // 9. Stations.
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
      v1: roundVOrNull(v1At[i]),
      refractorVelocity: roundVOrNull(plusTimeMs[i] === null ? null : v2At[i]),
      depthUncertainty: roundMOrNull(depthSigmaM(plusSigmaMs[i], v1At[i], v2At[i])),
      normalDepth: roundMOrNull(normalDepthM[i]),
      plusTime: roundMsOrNull(plusTimeMs[i]),
      minusTime: roundMsOrNull(combinedMinus.valueMs[i] ?? widest[i]),
      coverage,
      pairCount: pairCount[i],
    };
  });

  // 10. Velocities along the line, steps, velocity changes, dip, and the velocity analysis.
  const coveredX = geophoneX.filter((_, i) => plusTimeMs[i] !== null);
  const refractorVelocity =
    segments.length > 0 && coveredX.length > 0
      ? segments.map((g, k) => ({
          from: k === 0 ? coveredX[0] : roundM(g.from),
          to: k === segments.length - 1 ? coveredX[coveredX.length - 1] : roundM(g.to),
          velocity: roundV(g.velocity),
        }))
      : [];
  const velocityChanges = finalChanges.map((c) => ({ x: roundM(c.x), left: roundV(c.left), right: roundV(c.right) }));
  const layers = [v1, v2].filter((v): v is number => v !== null).map((v) => ({ velocity: roundV(v) }));
  if (v1 === null) layers.length = 0; // a V2 with no V1 above it is not a layer model

  const shotX = new Map(analysed.map((s) => [s.id, s.x]));
  const medianV1 = medianOf(v1At.filter(isNum)) ?? v1;
  const medianV2 = medianOf(v2At.filter(isNum)) ?? v2;
  const dip = steps.length > 0 ? null : planarDip(geophoneX, elevation, verticalDepthM, pairVelocities, shotX, medianV1, medianV2, pickUncertaintyMs);
  const refractorElevations = verticalDepthM.map((d, i) => (d === null ? null : elevation[i] - d));
  const dips = refractorDips(geophoneX, refractorElevations, depthSigmaFloorM(pickUncertaintyMs, medianV1, medianV2), [
    ...steps.map((st) => st.x),
    ...lateral.changes.map((c) => c.x),
  ]);
  const features = {
    steps: steps.map((st) => ({
      x: roundM(st.x),
      throw: roundM(st.throw),
      ...(st.delayJumpMs !== undefined ? { delayJumpMs: roundMs(st.delayJumpMs) } : {}),
      seenIn: st.seenIn ?? [],
      branchJumps: st.branchJumps.map((b) => ({ shot: b.shot, xSeen: roundM(b.xSeen), jumpMs: roundMs(b.jumpMs) })),
    })),
    velocityChanges,
    dip,
    // Added: a straight line through the refractor elevations of each piece between steps
    // and velocity changes (positive where the refractor deepens toward +x).
    localDips: dips.local.map((d) => ({ from: roundM(d.from), to: roundM(d.to), degrees: roundDeg(d.degrees), rmsM: roundM(d.rmsM), count: d.count })),
  };

  // Fields added to the contract's minusTimeVelocity: which distance T− was fitted against,
  // and the plain along-the-line velocity for comparison.
  const minusTimeVelocityOut: MinusTimeVelocityOutput | null = minusFit.ok
    ? {
        velocity: roundV(minusFit.velocity),
        standardError: roundV(minusFit.standardError),
        count: minusFit.count,
        distance: minusDistance,
        ...(alongLineFit.ok ? { alongLineVelocity: roundV(alongLineFit.velocity) } : {}),
        ...(segments.length > 1
          ? {
              segments: segments.map((g, k) => ({
                from: roundM(Math.max(g.from, coveredX[0])),
                to: roundM(Math.min(g.to, coveredX[coveredX.length - 1])),
                velocity: roundV(g.velocity),
                standardError: roundV(g.standardError),
                alongLineVelocity: roundV(alongLineVelocities[k]),
                count: segmentFits[k]?.count ?? 0,
              })),
            }
          : {}),
      }
    : null;
  const velocityAnalysis: VelocityAnalysis = {
    v1: roundVOrNull(v1),
    directVelocities: direct.perSide.map((p) => ({ ...p, velocity: roundV(p.velocity) })),
    pairs: pairVelocities,
    minusTimeVelocity: minusTimeVelocityOut,
  };

  const twoLayer: Interpretation = {
    method: 'plus-minus',
    ...(survey.name !== undefined ? { name: survey.name } : {}),
    stations,
    layers,
    refractorVelocity,
    features,
    qc: { reciprocal: reciprocal.checks.map(roundReciprocalCheck), warnings },
    shots: shots.map(roundShotBranches),
    velocityAnalysis: { ...velocityAnalysis, pairs: velocityAnalysis.pairs.map(roundPairVelocities) },
    cautions: [...CAUTIONS],
  };
  // Second refractor by layer stripping (engine/second-refractor.ts), then cautions from the data (engine/data-cautions.ts).
  const interpretation = withDataCautions(survey, withSecondRefractor(survey, twoLayer));
  // Residuals (engine/residuals.ts): picks against first arrivals modelled through this section. Keep last.
  return options.residuals === false ? interpretation : withResiduals(survey, interpretation);
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

/**
 * Variance of a pair's reciprocal time tAB = (forward + reverse)/2, ms² (reciprocalTimeOf,
 * engine/weighted-plus-times.ts). A reading without a recorded gap counts as at a geophone,
 * or as two spacings out when extrapolated.
 */
function reciprocalVarianceMs2(check: ReciprocalCheck, pickSigmaMs: number, spacingM: number): number {
  const gap = (gapM: number | undefined, source: ReciprocalCheck['forwardSource']): number =>
    gapM ?? (source === 'extrapolated' ? 2 * spacingM : 0);
  const readings = [
    { timeMs: check.forwardMs, gapM: gap(check.forwardGapM, check.forwardSource) },
    { timeMs: check.reverseMs, gapM: gap(check.reverseGapM, check.reverseSource) },
  ];
  return reciprocalTimeOf(readings, pickSigmaMs, spacingM)?.varianceMs2 ?? 0;
}

/**
 * Pairs whose T+ at a geophone disagree beyond their variances (χ² above its 99.9 %
 * quantile, pairCount − 1 degrees of freedom): one warning per run of such geophones.
 * A steep dip, a step near one pair's shots or a bad pick does this.
 */
function pairDisagreementWarnings(xs: number[], combined: ReturnType<typeof combineWeighted>): Warning[] {
  const bad = xs.map((_, i) => {
    const c = combined.chiSquare[i];
    return c !== null && c > chiSquareQuantile(0.999, combined.pairCount[i] - 1);
  });
  const warnings: Warning[] = [];
  for (let i = 0; i < xs.length; i++) {
    if (!bad[i] || (i > 0 && bad[i - 1])) continue;
    let j = i;
    while (j + 1 < xs.length && bad[j + 1]) j++;
    warnings.push({
      code: 'plus-times-disagree',
      message:
        `At ${i === j ? `x = ${fmtX(xs[i])} m` : `x = ${fmtX(xs[i])}–${fmtX(xs[j])} m`} the opposing pairs give plus times that differ by more than ` +
        `their pick uncertainty allows: a steep dip, a step near one pair's shots or a bad pick. The weighted mean is used.`,
      x: xs[i],
    });
  }
  return warnings;
}

/** Normal depths (arc radii) and vertical depths (envelope of arcs) for given V1, V2. */
function depthPass(
  xs: number[],
  elevation: number[],
  delayTimeMs: (number | null)[],
  v1At: (number | null)[],
  v2At: (number | null)[],
): { normalDepthM: (number | null)[]; verticalDepthM: (number | null)[]; feet: ReturnType<typeof arcFootPointsM> } {
  const normalDepthM = delayTimeMs.map((d, i) => {
    const v1 = v1At[i];
    const v2 = v2At[i];
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
function distanceAlongRefractorM(feet: ({ xM: number; elevationM: number } | null)[], xs: number[], stepXs: number[]): (number | null)[] {
  let s = 0;
  let previous: { xM: number; elevationM: number; x: number } | null = null;
  return feet.map((f, i) => {
    if (f === null) return null;
    if (previous) {
      // Across a step the head wave does not run down the step face: count the horizontal distance only.
      const across = stepXs.some((x) => (previous!.x - x) * (xs[i] - x) <= 0);
      const dz = across ? 0 : f.elevationM - previous.elevationM;
      s += Math.sign(f.xM - previous.xM || 1) * Math.hypot(f.xM - previous.xM, dz);
    }
    previous = { ...f, x: xs[i] };
    return s;
  });
}

/**
 * Each shot side's direct-wave velocity from the run of direct picks that starts at the shot
 * (stopping at the first pick of another branch: past it the first arrivals no longer
 * sample the ground next to the shot), by the Theil–Sen slope; placed at the middle of
 * that run, with its slowness standard error from the pick uncertainty or the run's own
 * scatter, whichever is larger. Runs of fewer than three picks are left out.
 */
function directSides(survey: Survey, shots: ShotAnalysis[], pickSigmaMs: number): DirectSide[] {
  const out: DirectSide[] = [];
  for (const shot of shots) {
    const times = survey.shots.find((s) => s.id === shot.id)?.times ?? [];
    for (const side of ['left', 'right'] as const) {
      const picks = survey.geophones
        .map((g, i) => ({ offset: Math.abs(g.x - shot.x), x: g.x, t: times[i], b: shot.branchOfPick[i] }))
        .filter((p) => (side === 'left' ? p.x < shot.x : p.x > shot.x) && isNum(p.t) && p.b !== null)
        .sort((p, q) => p.offset - q.offset);
      const run: { offset: number; x: number; t: number }[] = [];
      const lineOf = (r: typeof run): { slope: number; intercept: number } | null => {
        const slope = theilSenSlope(r.map((p) => p.offset), r.map((p) => p.t));
        return slope === null ? null : { slope, intercept: medianOf(r.map((p) => p.t - slope * p.offset)) ?? 0 };
      };
      for (const p of picks) {
        if (p.b !== 0) break;
        // A pick off the straight line of the run so far (RUN_BREAK_SIGMAS·σ) ends it: the branch code may
        // have kept a few refracted picks, or the top layer changes, beyond that point.
        const line = run.length >= 3 ? lineOf(run) : null;
        if (line && Math.abs((p.t as number) - line.intercept - line.slope * p.offset) > RUN_BREAK_SIGMAS * pickSigmaMs) break;
        run.push({ offset: p.offset, x: p.x, t: p.t as number });
      }
      if (run.length < 3) continue;
      const fitted = lineOf(run);
      if (fitted === null || !(fitted.slope > 0)) continue;
      const { slope, intercept } = fitted;
      // Residual scatter with n − 2 degrees of freedom (a line has two parameters).
      const rms = Math.sqrt(run.reduce((sum, p) => sum + (p.t - intercept - slope * p.offset) ** 2, 0) / Math.max(1, run.length - 2));
      out.push({
        shot: shot.id,
        side,
        velocity: 1000 / slope,
        xM: (shot.x + run[run.length - 1].x) / 2,
        slownessStandardErrorMsPerM: slownessStandardError(run.map((p) => p.offset), Math.max(pickSigmaMs, rms)),
      });
    }
  }
  return out;
}

/** Every shot's own first-refractor picks, one entry per side that has any. */
function refractedBranches(survey: Survey, shots: ShotAnalysis[]): RefractedBranch[] {
  const out: RefractedBranch[] = [];
  for (const shot of shots) {
    for (const side of ['left', 'right'] as const) {
      const timesMs = refractedTimes(survey, shot, side);
      if (timesMs.some((t) => t !== null)) out.push({ shot: shot.id, shotXM: shot.x, timesMs });
    }
  }
  return out;
}

/** Slowness mean of the segments' velocities over the covered positions, m/s; null with none. */
function lineVelocity(segments: RefractorVelocitySegment[], coveredX: number[]): number | null {
  if (segments.length === 0 || coveredX.length === 0) return null;
  const slowness = coveredX.reduce((sum, x) => sum + 1 / segments[segmentIndexAt(segments, x)].velocity, 0) / coveredX.length;
  return 1 / slowness;
}

/** Standard deviation of a depth from that of its plus time: σ_z = (σ_T+/2)·V1·V2/√(V2² − V1²), m. */
function depthSigmaM(plusSigmaMs: number | null, v1: number | null, v2: number | null): number | null {
  if (plusSigmaMs === null || v1 === null || v2 === null) return null;
  return normalDepthFromDelayM(plusSigmaMs / 2, v1, v2);
}

/** Depth noise of a single opposing pair (T+ sums three picks: σ_delay = σ·√3/2), m; the dip test's σ. */
function depthSigmaFloorM(pickSigmaMs: number, v1: number | null, v2: number | null): number {
  return (v1 !== null && v2 !== null ? normalDepthFromDelayM((pickSigmaMs * Math.sqrt(3)) / 2, v1, v2) : null) ?? 0.5;
}

function medianOf(values: number[]): number | null {
  if (values.length === 0) return null;
  const v = [...values].sort((a, b) => a - b);
  const m = v.length >> 1;
  return v.length % 2 ? v[m] : (v[m - 1] + v[m]) / 2;
}

/** Notes on the structure found: each step, each velocity change, and a lateral V1. */
function structureWarnings(steps: FoundStep[], changes: { x: number; left: number; right: number }[], lateralV1: boolean): Warning[] {
  const out: Warning[] = [];
  for (const st of steps) {
    out.push({
      code: 'refractor-step',
      message:
        `The refractor steps ${st.throw > 0 ? 'down' : 'up'} by about ${fmt(Math.abs(st.throw), 1)} m toward +x near x = ${fmtX(st.x)} m ` +
        `(seen in ${(st.seenIn ?? []).join(', ')}). Depths within a few metres of it are smoothed by the method.`,
      x: st.x,
    });
  }
  for (const c of changes) {
    out.push({
      code: 'refractor-velocity-change',
      message: `The refractor velocity changes from about ${Math.round(c.left)} to ${Math.round(c.right)} m/s near x = ${fmtX(c.x)} m (a change in rock type or weathering).`,
      x: c.x,
    });
  }
  if (lateralV1) {
    out.push({
      code: 'lateral-top-layer-velocity',
      message: 'The direct waves of different shots give different top-layer velocities, so V1 varies along the line: each station uses the velocity interpolated between the shots.',
    });
  }
  return out;
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
  pickSigmaMs: number,
): { timesMs: (number | null)[]; phantomed: boolean[]; varianceMs2: (number | null)[] } {
  const own = refractedTimes(survey, shot, side);
  const w = phantoms.find((q) => q.shot.id === shot.id && q.side === side);
  const p = w?.result;
  const phantomed = own.map((t, i) => t === null && !!p && p.timesMs[i] !== null);
  return {
    timesMs: own.map((t, i) => (t !== null ? t : phantomed[i] ? p!.timesMs[i] : null)),
    phantomed,
    varianceMs2: own.map((t, i) => (t !== null ? pickSigmaMs * pickSigmaMs : phantomed[i] ? w!.varianceMs2[i] : null)),
  };
}

/**
 * For each end shot, phantoms its missing refracted arrivals (on the side facing the
 * spread) from every off-end shot on the same side whose refracted branch runs parallel
 * to the end shot's where both were recorded (RMS of the difference within
 * PHANTOM_PARALLEL_FACTOR pick uncertainties); their phantoms are merged by inverse
 * variance (phantom.ts). With no parallel candidate, the one that fills most geophones is
 * used (and the caller warns). The main source reported is the accepted candidate that
 * fills most geophones, then the nearest.
 */
function phantomEndShots(survey: Survey, shots: ShotAnalysis[], pickSigmaMs: number): PhantomWork[] {
  const work: PhantomWork[] = [];
  for (const shot of shots) {
    if (shot.position !== 'end-left' && shot.position !== 'end-right') continue;
    const side = shot.position === 'end-left' ? 'right' : 'left';
    const offEnd = shots
      .filter((s) => s.position === (side === 'right' ? 'off-end-left' : 'off-end-right'))
      .sort((p, q) => Math.abs(p.x - shot.x) - Math.abs(q.x - shot.x));
    const target = refractedTimes(survey, shot, side);
    const eligible = survey.geophones.map((g) => (side === 'right' ? g.x > shot.x : g.x < shot.x));
    const tried: PhantomWork['tried'] = [];
    for (const from of offEnd) {
      const result = phantomArrivals({ targetRefractedMs: target, sourceRefractedMs: refractedTimes(survey, from, side), eligible });
      if (result) tried.push({ from, result, parallel: result.parallelRmsMs <= PHANTOM_PARALLEL_FACTOR * pickSigmaMs, used: false });
    }
    const parallel = tried.filter((t) => t.parallel && t.result.phantomCount > 0);
    const fills = (t: (typeof tried)[number]): number => t.result.phantomCount;
    const accepted = parallel.length > 0 ? parallel : tried.length > 0 ? [tried.reduce((b, t) => (fills(t) > fills(b) ? t : b))] : [];
    accepted.forEach((t) => (t.used = true));
    const main = accepted.reduce<(typeof tried)[number] | null>((b, t) => (!b || fills(t) > fills(b) ? t : b), null);
    let result: PhantomResult | null = null;
    let varianceMs2: (number | null)[] = survey.geophones.map(() => null);
    if (main) {
      const merged = mergePhantoms(accepted.map((t) => t.result), pickSigmaMs);
      result = { ...main.result, timesMs: merged.timesMs, phantomCount: merged.timesMs.filter((t) => t !== null).length };
      varianceMs2 = merged.varianceMs2;
    }
    work.push({ shot, side, candidates: offEnd.map((s) => s.id), from: main?.from ?? null, result, varianceMs2, tried });
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
/** Output precision for the per-shot branch lines, the reciprocal checks and the pair velocities. */
function roundBranchLine(line: BranchLine): BranchLine {
  return { ...line, velocity: roundV(line.velocity), interceptMs: roundMs(line.interceptMs), fromX: roundM(line.fromX), toX: roundM(line.toX), rmsMs: roundMs(line.rmsMs) };
}

function roundSide(side: SideBranches | null): SideBranches | null {
  if (!side) return null;
  return {
    ...side,
    direct: side.direct ? roundBranchLine(side.direct) : null,
    refracted: side.refracted.map(roundBranchLine),
    crossoverDistance: side.crossoverDistance === null ? null : roundM(side.crossoverDistance),
  };
}

function roundShotBranches(shot: ShotAnalysis): ShotAnalysis {
  return { ...shot, left: roundSide(shot.left), right: roundSide(shot.right) };
}

function roundReciprocalCheck(c: ReciprocalCheck): ReciprocalCheck {
  return {
    ...c,
    forwardMs: roundMs(c.forwardMs),
    reverseMs: roundMs(c.reverseMs),
    differenceMs: roundMs(c.differenceMs),
    ...(c.forwardGapM !== undefined ? { forwardGapM: roundM(c.forwardGapM) } : {}),
    ...(c.reverseGapM !== undefined ? { reverseGapM: roundM(c.reverseGapM) } : {}),
  };
}

function roundPairVelocities(p: OpposingPairVelocities): OpposingPairVelocities {
  return {
    ...p,
    downDipVelocity: roundV(p.downDipVelocity),
    upDipVelocity: roundV(p.upDipVelocity),
    trueVelocity: roundV(p.trueVelocity),
    trueVelocityGentleDip: roundV(p.trueVelocityGentleDip),
    dipDegrees: roundDeg(p.dipDegrees),
    criticalAngleDegrees: roundDeg(p.criticalAngleDegrees),
    depthUnderShots: p.depthUnderShots.map((d) => ({ ...d, normalDepth: roundM(d.normalDepth), verticalDepth: roundM(d.verticalDepth) })),
  };
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
