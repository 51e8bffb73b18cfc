/**
 * The first refractor's section from its delay times: steps, the refractor velocity along
 * the line and the depths under every geophone, each refined with the others.
 *  1. first-pass depths with V1 along the line and the line V2;
 *  2. steps from the delay times and every shot's refracted branches (findSteps), and the
 *     zones where T− is not straight over a uniform refractor (around steps and bends);
 *  3. hinges of the combined T− with those zones masked → V2 segments, refined against
 *     distance along the refractor (refractor-velocity-segments.ts), depths recomputed;
 *  4. steps searched again with the final depths.
 * Units: m, ms, m/s. Unrounded.
 */
import { median } from 'simple-statistics';
import { isFiniteNumber } from '../shared/numbers.js';
import type { RefractedBranch, FoundStep, RefractorVelocitySegment } from '../structure/structure-features.js';
import { bendZones, findSteps, lateralRefractorVelocity, mergeZones, stepZones } from '../structure/structure-features.js';
import { minusTimeNoiseMs } from '../structure/minus-time-noise.js';
import { combineMinusTimes, type WeightedCombination } from '../plus-minus/plus-minus.js';
import type { PairPlusMinus } from '../plus-minus/refractor-plus-times.js';
import type { MinusTimeVelocityResult } from '../velocities/minus-time-velocity.js';
import { refractorVelocitySegments } from '../velocities/refractor-velocity-segments.js';
import { depthPass, depthSigmaM, type DepthPass } from './depth-pass.js';

export interface FirstRefractorInput {
  xsM: number[];
  elevationM: number[];
  spacingM: number;
  delayTimeMs: (number | null)[];
  plusSigmaMs: (number | null)[];
  /** Pairs whose T− give velocities (the trusted ones, else all). */
  minusPairs: PairPlusMinus[];
  v1: number | null;
  v1At: (number | null)[];
  lineV2: number | null;
  lineFit: MinusTimeVelocityResult;
  branches: RefractedBranch[];
  pickSigmaMs: number;
}

export interface FirstRefractorSection {
  steps: FoundStep[];
  segments: RefractorVelocitySegment[];
  /** Velocity changes between the final segments, m/s. */
  changes: { x: number; left: number; right: number }[];
  segmentFits: (MinusTimeVelocityResult | null)[];
  alongLineVelocities: number[];
  minusDistance: 'along-line' | 'along-refractor';
  /** Inverse-variance combination of the pairs' T−. */
  combinedMinus: WeightedCombination;
  v2At: (number | null)[];
  depths: DepthPass;
}

/** See the file comment. */
export function firstRefractorSection(input: FirstRefractorInput): FirstRefractorSection {
  const { xsM, elevationM, delayTimeMs, v1, v1At, lineV2, pickSigmaMs } = input;
  const canSearch = v1 !== null && lineV2 !== null;
  const stepSearch = (normalDepthM: (number | null)[]): FoundStep[] =>
    canSearch
      ? findSteps({ xM: xsM, delayTimeMs, normalDepthM, groundElevationM: elevationM, referenceV1MPerS: v1, referenceV2MPerS: lineV2, pickSigmaMs, branches: input.branches })
      : [];
  const firstPass = depthPass(xsM, elevationM, delayTimeMs, v1At, xsM.map(() => lineV2));
  const firstSteps = stepSearch(firstPass.normalDepthM);
  const firstElevations = firstPass.verticalDepthM.map((d, i) => (d === null ? null : elevationM[i] - d));
  const firstSigmasM = xsM.map((_, i) => depthSigmaM(input.plusSigmaMs[i], v1At[i], lineV2)).filter(isFiniteNumber);
  const zones = canSearch
    ? mergeZones([
        ...stepZones(firstSteps, xsM, firstPass.normalDepthM, v1, lineV2),
        ...bendZones(xsM, firstElevations, firstPass.normalDepthM, v1, lineV2, firstSigmasM.length > 0 ? median(firstSigmasM) : 0),
      ])
    : [];
  const inZone = xsM.map((x) => zones.some((z) => x >= z.from && x <= z.to));

  const pairMinusMs = input.minusPairs.map((p) => p.minusTimeMs);
  const combinedMinus = combineMinusTimes(pairMinusMs, input.minusPairs.map((p) => p.minusVarianceMs2), xsM.length);
  const noiseMs = minusTimeNoiseMs(input.minusPairs, xsM.length, pickSigmaMs);
  const lateral = canSearch && noiseMs !== null ? lateralRefractorVelocity(xsM, combinedMinus.valueMs, zones, noiseMs) : { segments: [], changes: [], noiseSigmaMs: 0 };
  // Within z·tan(ic) of a change a station's head waves sample both sides: left out of the fits.
  const nearChange = xsM.map((x, i) => {
    const z = firstPass.normalDepthM[i] ?? 0;
    const reach = canSearch ? z * Math.tan(Math.asin(v1 / lateral.changes.reduce((m, c) => Math.min(m, c.left, c.right), lineV2))) : 0;
    return lateral.changes.some((c) => Math.abs(x - c.x) <= reach + input.spacingM / 2);
  });
  const refined = refractorVelocitySegments({
    xsM,
    elevationM,
    delayTimeMs,
    pairMinusMs,
    v1,
    v1At,
    lineV2,
    lineFit: input.lineFit,
    lateral,
    masked: xsM.map((_, i) => inZone[i] || nearChange[i]),
    firstPass,
    stepXsM: firstSteps.map((st) => st.x),
    canRefine: canSearch,
  });
  const { segments } = refined;
  return {
    steps: stepSearch(refined.depths.normalDepthM),
    segments,
    changes: lateral.changes.map((c, k) => ({ x: c.x, left: segments[k].velocity, right: segments[k + 1].velocity })),
    segmentFits: refined.fits,
    alongLineVelocities: refined.alongLineVelocities,
    minusDistance: refined.distance,
    combinedMinus,
    v2At: refined.v2At,
    depths: refined.depths,
  };
}
