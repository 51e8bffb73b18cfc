/**
 * V2 per segment of the line, refined against distance along the refractor. The segments
 * come from the hinges of the combined T− (structure-features.ts); each segment's V2 is the
 * common T− slope of every pair over it (minus-time-velocity.ts), first against x, then
 * (REFRACTOR_DISTANCE_PASSES times) against distance between the feet of the depth arcs,
 * which removes the 1/cos(dip) bias. Neighbours that end within MIN_SEGMENT_CHANGE of each
 * other are merged. Each pass recomputes the depths with the new V2.
 */
import { depthPass, type DepthPass } from '../depth/depth-pass.js';
import { distanceAlongRefractorM } from '../depth/distance-along-refractor.js';
import { isFiniteNumber } from '../shared/numbers.js';
import type { NanNone } from '../shared/nan-none.js';
import {
  localRefractorVelocities,
  segmentIndexAt,
  segmentMinusVelocity,
  type LateralVelocityResult,
  type RefractorVelocitySegment,
} from '../structure/structure-features.js';
import type { MinusTimeVelocityResult } from './minus-time-velocity.js';

/** Smallest relative difference of neighbouring refractor velocities kept as a change. Common practice (as engine/structure/velocity-changes.ts). */
const MIN_SEGMENT_CHANGE = 0.05;

/** Refinements of V2 against distance along the refractor (each recomputes the arcs). */
const REFRACTOR_DISTANCE_PASSES = 2;

export interface SegmentInput {
  xsM: number[];
  elevationM: number[];
  delayTimeMs: (number | null)[];
  /** T− of each pair used for velocities. */
  pairMinusMs: NanNone[];
  v1: number | null;
  v1At: (number | null)[];
  /** The line V2 and its fit, the single segment when no change is found. */
  lineV2: number | null;
  lineFit: MinusTimeVelocityResult;
  /** Hinges of the combined T− (changed in place when segments merge). */
  lateral: LateralVelocityResult;
  /** Geophones left out of every fit: step and bend zones, and near a velocity change. */
  masked: boolean[];
  firstPass: DepthPass;
  stepXsM: number[];
  /** False without V1 or line V2: one fit against x, no refinement. */
  canRefine: boolean;
}

export interface RefractorVelocitySegments {
  segments: RefractorVelocitySegment[];
  /** The fit behind each segment's velocity (null where the segment kept its detector value). */
  fits: (MinusTimeVelocityResult | null)[];
  /** Each segment's V2 against x, m/s, before the along-refractor refinement. */
  alongLineVelocities: number[];
  /** What the last fit was made against. */
  distance: 'along-line' | 'along-refractor';
  /** V2 under each station, and the depths computed with it. */
  v2At: (number | null)[];
  depths: DepthPass;
}

/** See the file comment. Cost: O(passes · segments · pairs · geophones) plus one depth pass per refinement. */
export function refractorVelocitySegments(input: SegmentInput): RefractorVelocitySegments {
  const { xsM, elevationM, delayTimeMs, pairMinusMs, v1, v1At, lineV2, lineFit, lateral, masked, firstPass } = input;
  const segments: RefractorVelocitySegment[] =
    lateral.changes.length > 0
      ? lateral.segments.map((g) => ({ ...g }))
      : lineV2 !== null
        ? [{ from: -Infinity, to: Infinity, velocity: lineV2, standardError: lineFit.ok ? lineFit.standardError : 0 }]
        : [];
  const useOf = (): boolean[][] => segments.map((_, k) => xsM.map((x, i) => segmentIndexAt(segments, x) === k && !masked[i]));
  let segmentUse = useOf();
  let fits: (MinusTimeVelocityResult | null)[] = segments.map(() => null);
  const fastestV1 = Math.max(v1 ?? 0, ...v1At.filter(isFiniteNumber));
  const fitSegments = (abscissa: (number | null)[], minCount: number[] | null): boolean => {
    let changed = false;
    segments.forEach((seg, k) => {
      const fit = segmentMinusVelocity(pairMinusMs, abscissa, segmentUse[k]);
      if (!fit.ok || v1 === null || !(fit.velocity > fastestV1)) return;
      if (minCount && fit.count < minCount[k]) return;
      seg.velocity = fit.velocity;
      seg.standardError = fit.standardError;
      fits[k] = fit;
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
      fits = segments.map(() => null);
      fitSegments(abscissa, null);
    }
  };
  fitSegments(xsM, null);
  mergeSimilar(xsM);
  let alongLineCounts = fits.map((f) => (f && f.ok ? f.count : 0));
  let alongLineVelocities = segments.map((g) => g.velocity);
  const v2AtFor = (normalDepthM: (number | null)[]): (number | null)[] => localRefractorVelocities(xsM, segments, normalDepthM, v1At);
  let v2At = v2AtFor(firstPass.normalDepthM);
  let depths = depthPass(xsM, elevationM, delayTimeMs, v1At, v2At);
  let distance: RefractorVelocitySegments['distance'] = 'along-line';
  for (let pass = 0; pass < REFRACTOR_DISTANCE_PASSES && input.canRefine; pass++) {
    const alongRefractor = distanceAlongRefractorM(depths.feet, xsM, input.stepXsM);
    if (!fitSegments(alongRefractor, alongLineCounts)) break;
    const count = segments.length;
    mergeSimilar(xsM);
    if (segments.length !== count) {
      alongLineCounts = fits.map((f) => (f && f.ok ? f.count : 0));
      alongLineVelocities = segments.map((g) => g.velocity);
      fitSegments(alongRefractor, alongLineCounts);
    }
    distance = 'along-refractor';
    v2At = v2AtFor(depths.normalDepthM);
    depths = depthPass(xsM, elevationM, delayTimeMs, v1At, v2At);
  }
  return { segments, fits, alongLineVelocities, distance, v2At, depths };
}

/**
 * One V2 for the layer list: the slowness mean of the segments' velocities over the covered
 * positions (travel time is additive in slowness), m/s; null with none. Cost: O(covered · segments).
 */
export function layerVelocity(segments: RefractorVelocitySegment[], coveredXM: number[]): number | null {
  if (segments.length === 0 || coveredXM.length === 0) return null;
  const slowness = coveredXM.reduce((sum, x) => sum + 1 / segments[segmentIndexAt(segments, x)].velocity, 0) / coveredXM.length;
  return 1 / slowness;
}
