/**
 * Closed-form first arrivals over one planar refractor (two layers), for any source and
 * receiver positions on or above the refractor, with topography.
 *
 * Head wave between surface points A and B over a plane refractor (Kearey, Brooks & Hill,
 * An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5; Telford, Geldart &
 * Sheriff, Applied Geophysics, 2nd ed., 1990, ch. 4):
 *   t = (dA + dB)·cos(ic)/V1 + L/V2,   ic = asin(V1/V2)
 * where dA, dB are the perpendicular distances from A and B to the plane and L is the
 * distance between their feet on the plane. The head wave exists when
 * L ≥ (dA + dB)·tan(ic). For a flat refractor at depth h and surface points this reduces
 * to t = x/V2 + 2h·cos(ic)/V1. Direct wave: t = |AB|/V1 (straight ray in layer 1).
 */

export interface PlanarRefractorModel {
  /** Top-layer velocity, m/s. */
  v1: number;
  /** Refractor velocity, m/s (> v1). */
  v2: number;
  /** Elevation of the refractor at x = 0, m. */
  refractorElevationAtZero: number;
  /** Dip, degrees, positive where the refractor deepens toward +x. */
  dipDegrees: number;
}

export interface SurfacePoint {
  x: number;
  elevation: number;
}

/** Perpendicular distance from a point to the refractor plane (positive above it), m. */
export function perpendicularDistanceToRefractor(model: PlanarRefractorModel, p: SurfacePoint): number {
  const theta = (model.dipDegrees * Math.PI) / 180;
  const refractorZ = model.refractorElevationAtZero - Math.tan(theta) * p.x;
  return (p.elevation - refractorZ) * Math.cos(theta);
}

/** Head-wave time from a to b, ms; null where the head wave does not exist (inside the critical distance). */
export function headWaveTimeMs(model: PlanarRefractorModel, a: SurfacePoint, b: SurfacePoint): number | null {
  const theta = (model.dipDegrees * Math.PI) / 180;
  const ic = Math.asin(model.v1 / model.v2);
  const dA = perpendicularDistanceToRefractor(model, a);
  const dB = perpendicularDistanceToRefractor(model, b);
  // Distance along the plane between the feet of the perpendiculars: project AB onto the
  // plane's down-dip unit vector (cos θ, −sin θ).
  const along = Math.abs((b.x - a.x) * Math.cos(theta) - (b.elevation - a.elevation) * Math.sin(theta));
  if (along < (dA + dB) * Math.tan(ic)) return null;
  return (1000 * ((dA + dB) * Math.cos(ic))) / model.v1 + (1000 * along) / model.v2;
}

/** Direct-wave time from a to b, ms. */
export function directWaveTimeMs(model: PlanarRefractorModel, a: SurfacePoint, b: SurfacePoint): number {
  return (1000 * Math.hypot(b.x - a.x, b.elevation - a.elevation)) / model.v1;
}

/** First arrival (direct or head wave, whichever is earlier), ms. */
export function firstArrivalMs(model: PlanarRefractorModel, a: SurfacePoint, b: SurfacePoint): number {
  const direct = directWaveTimeMs(model, a, b);
  const head = headWaveTimeMs(model, a, b);
  return head === null ? direct : Math.min(direct, head);
}

/** Vertical depth of the refractor below a surface point, m. */
export function verticalDepthToRefractor(model: PlanarRefractorModel, p: SurfacePoint): number {
  const theta = (model.dipDegrees * Math.PI) / 180;
  return p.elevation - (model.refractorElevationAtZero - Math.tan(theta) * p.x);
}
