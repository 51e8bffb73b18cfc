/**
 * Planar dip of the refractor: one straight line through the refractor elevations, and
 * whether one line is enough.
 *
 * Least-squares line e(x) = a + b·x through the refractor elevations (m) at positions x
 * (m). Dip θ = atan(−b), in degrees, positive where the refractor deepens toward +x
 * (api-v1.md), i.e. where its elevation falls with x. interceptM = a, the refractor's
 * elevation at x = 0. Fit test: with independent errors of standard deviation σ, the
 * residual sum of squares over σ² is χ² with n − 2 degrees of freedom if the plane is
 * right (Draper & Smith, Applied Regression Analysis, 3rd ed., 1998, ch. 2); `fits` is
 * true when RSS/σ² ≤ χ²_{0.99}(n − 2), a 1 % chance of rejecting a true plane. Below 3
 * points there is nothing to test and fits is false.
 */
import { leastSquares } from './least-squares.js';
import { chiSquareQuantile } from './quantiles.js';
import { checkPositions, checkPositive, checkValues, presentPoints, StructureInputError } from './structure-input.js';

export interface PlanarDipFit {
  /** Dip, degrees, positive where the refractor deepens toward +x. */
  degrees: number;
  /** Refractor elevation at x = 0, m. */
  interceptM: number;
  /** Root-mean-square residual, m. */
  rmsM: number;
  /** True when the residuals are within the noise (χ² test at the 99 % level). */
  fits: boolean;
  /** Points used. */
  count: number;
  /** One standard error of the dip, degrees (from σ). */
  standardErrorDegrees: number;
}

/** Line fit of elevations against x; null with fewer than two points. */
function fitLine(x: readonly number[], e: readonly number[], sigmaM: number): PlanarDipFit | null {
  if (x.length < 2) return null;
  const xMean = x.reduce((s, v) => s + v, 0) / x.length;
  const fit = leastSquares(x.map((xi) => [1, xi - xMean]), e);
  if (!fit) return null;
  const [aCentred, b] = fit.coefficients;
  const n = x.length;
  const dof = n - 2;
  const fits = dof >= 1 && fit.rss / (sigmaM * sigmaM) <= chiSquareQuantile(0.99, dof);
  // d(atan(−b))/db = −1/(1 + b²); σ_b = σ·√C₁₁.
  const seSlope = sigmaM * Math.sqrt(fit.unscaledCovariance[1][1]);
  return {
    degrees: (Math.atan(-b) * 180) / Math.PI,
    interceptM: aCentred - b * xMean,
    rmsM: Math.sqrt(fit.rss / n),
    fits,
    count: n,
    standardErrorDegrees: ((seSlope / (1 + b * b)) * 180) / Math.PI,
  };
}

/**
 * One plane through all refractor elevations (null entries skipped). sigmaM is the
 * standard deviation of one elevation, m. Returns null with fewer than two elevations.
 */
export function planarDip(xM: number[], refractorElevationM: (number | null)[], sigmaM: number): PlanarDipFit | null {
  checkPositions(xM);
  checkValues(refractorElevationM, xM.length, 'refractorElevationM');
  checkPositive(sigmaM, 'sigmaM');
  const { x, y } = presentPoints(xM, refractorElevationM);
  return fitLine(x, y, sigmaM);
}

export interface LocalDip extends PlanarDipFit {
  from: number;
  to: number;
}

/**
 * Dip per segment [from, to] (inclusive), e.g. the refractor-velocity segments; null for a
 * segment with fewer than two elevations. sigmaM defaults to 0.5 m (common practice for
 * plus-minus depths; pass the real value when known).
 */
export function localDips(xM: number[], refractorElevationM: (number | null)[], segments: { from: number; to: number }[], sigmaM = 0.5): (LocalDip | null)[] {
  checkPositions(xM);
  checkValues(refractorElevationM, xM.length, 'refractorElevationM');
  checkPositive(sigmaM, 'sigmaM');
  if (!Array.isArray(segments)) throw new StructureInputError('segments', 'must be an array of {from, to}');
  return segments.map((seg, i) => {
    if (!seg || !Number.isFinite(seg.from) || !Number.isFinite(seg.to) || seg.to < seg.from) {
      throw new StructureInputError(`segments[${i}]`, `must have finite from ≤ to, got ${JSON.stringify(seg)}`);
    }
    const { x, y } = presentPoints(xM, refractorElevationM);
    const keep = x.map((xi, k) => (xi >= seg.from && xi <= seg.to ? k : -1)).filter((k) => k >= 0);
    const fit = fitLine(keep.map((k) => x[k]), keep.map((k) => y[k]), sigmaM);
    return fit ? { from: seg.from, to: seg.to, ...fit } : null;
  });
}
