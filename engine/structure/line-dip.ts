/**
 * The one dip of the line reported in features.dip: the planar fit of refractor-dips when
 * its χ² test accepts one plane (planar-dip.ts: Draper & Smith 1998, ch. 2, at the 99 %
 * level), with the slope-intercept dip of the outermost opposing pair beside it for
 * comparison; that slope-intercept dip alone when there are too few depths to test.
 */
import { median } from 'simple-statistics';
import type { OpposingPairVelocities, ShotAnalysis } from '../output/interpretation.js';
import { singlePairDepthSigmaM } from '../depth/depth-pass.js';
import { isFiniteNumber } from '../shared/numbers.js';
import type { LocalDip, PlanarDipFit } from './planar-dip.js';
import { refractorDips } from './structure-features.js';

/** Points below which a plane cannot be tested (a line has two parameters, the test needs a degree of freedom). */
const MIN_TESTABLE_DEPTHS = 3;

/** Dip of the refractor, degrees, positive where it deepens toward +x; unrounded. */
export interface LineDip {
  degrees: number;
  source: 'refractor-elevations' | 'slope-intercept';
  /** RMS of the refractor elevations about the plane, m. */
  rmsM?: number;
  slopeInterceptDegrees?: number;
  slopeInterceptShots?: [string, string];
}

/**
 * features.dip: null where a step was found or the χ² test rejects one plane (no single
 * planar dip describes the refractor); the tested plane where it fits; with fewer than
 * MIN_TESTABLE_DEPTHS depths, the slope-intercept dip of the outermost pair, if any.
 * Cost: O(pairs).
 */
export function lineDip(
  planar: PlanarDipFit | null,
  depthCount: number,
  stepCount: number,
  pairs: OpposingPairVelocities[],
  shotXM: Map<string, number>,
): LineDip | null {
  if (stepCount > 0) return null;
  const outermost = outermostPair(pairs, shotXM);
  if (depthCount >= MIN_TESTABLE_DEPTHS) {
    if (planar === null) return null;
    return {
      degrees: planar.degrees,
      source: 'refractor-elevations',
      rmsM: planar.rmsM,
      ...(outermost ? { slopeInterceptDegrees: outermost.dipDegrees, slopeInterceptShots: outermost.shots } : {}),
    };
  }
  if (outermost && Number.isFinite(outermost.dipDegrees)) {
    return { degrees: outermost.dipDegrees, source: 'slope-intercept', slopeInterceptShots: outermost.shots };
  }
  return null;
}

/** The slope-intercept result of the pair whose shots lie furthest apart. */
function outermostPair(pairs: OpposingPairVelocities[], shotXM: Map<string, number>): OpposingPairVelocities | null {
  const width = (p: OpposingPairVelocities): number => (shotXM.get(p.shots[1]) ?? 0) - (shotXM.get(p.shots[0]) ?? 0);
  return pairs.reduce<OpposingPairVelocities | null>((best, p) => (!best || width(p) > width(best) ? p : best), null);
}

export interface SectionDipsInput {
  xsM: number[];
  elevationM: number[];
  /** Vertical depth to the refractor under each geophone, m. */
  depthM: (number | null)[];
  /** Where the refractor breaks: steps and velocity changes, m. */
  stepXsM: number[];
  changeXsM: number[];
  /** Line velocities and per-station ones (their medians set the depth noise), m/s. */
  v1: number | null;
  v2: number | null;
  v1At: (number | null)[];
  v2At: (number | null)[];
  pickSigmaMs: number;
  pairs: OpposingPairVelocities[];
  shots: ShotAnalysis[];
}

/**
 * The section's dips from one test: refractorDips with σ the single-pair depth noise at
 * the median V1 and V2 gives the planar fit (→ lineDip → features.dip) and the local dips
 * between steps and velocity changes (→ features.localDips). Cost: O(n log n) for the
 * medians plus the fits, O(n).
 */
export function sectionDips(input: SectionDipsInput): { dip: LineDip | null; local: LocalDip[] } {
  const { xsM, elevationM, depthM } = input;
  const medianOf = (values: (number | null)[]): number | null => {
    const finite = values.filter(isFiniteNumber);
    return finite.length > 0 ? median(finite) : null;
  };
  const sigmaM = singlePairDepthSigmaM(input.pickSigmaMs, medianOf(input.v1At) ?? input.v1, medianOf(input.v2At) ?? input.v2);
  const elevations = depthM.map((d, i) => (d === null ? null : elevationM[i] - d));
  const dips = refractorDips(xsM, elevations, sigmaM, [...input.stepXsM, ...input.changeXsM]);
  const depthCount = depthM.filter((d) => d !== null).length;
  const shotXM = new Map(input.shots.map((s) => [s.id, s.x]));
  return { dip: lineDip(dips.planar, depthCount, input.stepXsM.length, input.pairs, shotXM), local: dips.local };
}
