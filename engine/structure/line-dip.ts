/**
 * The one dip of the line reported in features.dip, and the slope-intercept dip of the
 * outermost opposing pair beside it.
 */
import { linearRegression } from 'simple-statistics';
import type { OpposingPairVelocities } from '../output/interpretation.js';

/** A planar dip is reported when refractor elevations fit a line within this many depth standard deviations (RMS). Common practice. */
const PLANAR_FIT_FACTOR = 2;

/** Dip of the refractor, degrees, positive where it deepens toward +x; unrounded. */
export interface LineDip {
  degrees: number;
  source: 'refractor-elevations' | 'slope-intercept';
  rmsM?: number;
  slopeInterceptDegrees?: number;
  slopeInterceptShots?: [string, string];
}

/**
 * Planar dip, degrees (positive where the refractor deepens toward +x).
 * From a least-squares line through the refractor elevations when they fit it within
 * PLANAR_FIT_FACTOR depth standard deviations (σ_z from the pick uncertainty: T+ sums
 * three picks, so σ_delay = σ_pick·√3/2, σ_z = σ_delay·V1/cos ic); null when they do not
 * (no single planar dip describes the refractor). With fewer than three depths, the
 * slope-intercept dip of the outermost opposing pair, if any.
 */
export function lineDip(
  xs: number[],
  elevation: number[],
  depth: (number | null)[],
  pairs: OpposingPairVelocities[],
  shotX: Map<string, number>,
  v1: number | null,
  v2: number | null,
  pickUncertaintyMs: number,
): LineDip | null {
  const points: [number, number][] = [];
  depth.forEach((d, i) => {
    if (d !== null) points.push([xs[i], elevation[i] - d]);
  });
  const outermost = outermostPair(pairs, shotX);
  const slopeInterceptDegrees = outermost ? outermost.dipDegrees : null;
  if (points.length >= 3 && v1 !== null && v2 !== null && points[points.length - 1][0] > points[0][0]) {
    const { m, b } = linearRegression(points);
    const rmsM = Math.sqrt(points.reduce((s, [x, y]) => s + (y - (m * x + b)) ** 2, 0) / points.length);
    const sigmaDepthM = (((pickUncertaintyMs * Math.sqrt(3)) / 2 / 1000) * v1 * v2) / Math.sqrt(v2 * v2 - v1 * v1);
    if (!(rmsM <= PLANAR_FIT_FACTOR * sigmaDepthM)) return null;
    const degrees = (Math.atan(-m) * 180) / Math.PI;
    return {
      degrees,
      source: 'refractor-elevations',
      rmsM,
      ...(slopeInterceptDegrees !== null ? { slopeInterceptDegrees, slopeInterceptShots: outermost!.shots } : {}),
    };
  }
  if (outermost && Number.isFinite(outermost.dipDegrees)) {
    return { degrees: outermost.dipDegrees, source: 'slope-intercept', slopeInterceptShots: outermost.shots };
  }
  return null;
}

/** The slope-intercept result of the pair whose shots lie furthest apart. */
function outermostPair(pairs: OpposingPairVelocities[], shotX: Map<string, number>): OpposingPairVelocities | null {
  const width = (p: OpposingPairVelocities): number => (shotX.get(p.shots[1]) ?? 0) - (shotX.get(p.shots[0]) ?? 0);
  return pairs.reduce<OpposingPairVelocities | null>((best, p) => (!best || width(p) > width(best) ? p : best), null);
}
