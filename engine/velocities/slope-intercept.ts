/**
 * Slope-intercept interpretation of a dipping planar refractor from a reversed pair of
 * refracted branches (Kearey, Brooks & Hill, An Introduction to Geophysical Exploration,
 * 3rd ed., 2002, ch. 5; Telford, Geldart & Sheriff, Applied Geophysics, 2nd ed., 1990, ch. 4):
 *   Vd = V1 / sin(ic + θ),  Vu = V1 / sin(ic − θ)           (apparent, down- and up-dip)
 *   ic = ½[asin(V1/Vd) + asin(V1/Vu)],  θ = ½[asin(V1/Vd) − asin(V1/Vu)],  V2 = V1 / sin ic
 *   gentle dips: V2 ≈ 2·Vd·Vu·cos θ / (Vd + Vu)
 *   perpendicular depth under a shot h = V1·ti / (2 cos ic), vertical depth h / cos θ
 * Units: m/s, ms (intercepts), m, degrees out.
 */
import type { OpposingPairVelocities, ShotAnalysis } from '../output/interpretation.js';

export interface SlopeInterceptDip {
  /** True refractor velocity V2, m/s. */
  trueVelocity: number;
  /** 2·Vd·Vu·cosθ/(Vd+Vu), m/s. */
  trueVelocityGentleDip: number;
  criticalAngleDegrees: number;
  /**
   * Dip θ, degrees: positive when the refractor deepens in the direction in which the
   * vDownDip branch was shot (i.e. when vDownDip < vUpDip); negative otherwise.
   */
  dipDegrees: number;
}

const DEG = 180 / Math.PI;

/**
 * Exact dip and true velocity from V1 and the two apparent velocities, m/s.
 * Null (never NaN) when a velocity is not a positive finite number or V1 is not below
 * both apparent velocities (no head wave could have been recorded).
 * @example slopeInterceptDip(600, 2000, 2000) // { trueVelocity: 2000, dipDegrees: 0, … }
 */
export function slopeInterceptDip(v1: number, vDownDip: number, vUpDip: number): SlopeInterceptDip | null {
  const ok = (v: number): boolean => Number.isFinite(v) && v > 0;
  if (!ok(v1) || !ok(vDownDip) || !ok(vUpDip)) return null;
  if (!(v1 < vDownDip && v1 < vUpDip)) return null;
  const alphaDown = Math.asin(v1 / vDownDip); // ic + θ
  const alphaUp = Math.asin(v1 / vUpDip); // ic − θ
  const ic = (alphaDown + alphaUp) / 2;
  const theta = (alphaDown - alphaUp) / 2;
  const trueVelocity = v1 / Math.sin(ic);
  const gentle = (2 * vDownDip * vUpDip * Math.cos(theta)) / (vDownDip + vUpDip);
  if (!Number.isFinite(trueVelocity) || !Number.isFinite(gentle)) return null;
  return { trueVelocity, trueVelocityGentleDip: gentle, criticalAngleDegrees: ic * DEG, dipDegrees: theta * DEG };
}

/**
 * Velocities, dip and depths from an opposing pair: `left` shoots its first refracted
 * branch toward +x (its right side), `right` lies further right and shoots toward −x.
 * The dip is positive where the refractor deepens toward +x (api-v1.md): then `left`
 * shoots down-dip. Null when either branch is missing, the shots are not in that order,
 * or the velocities admit no solution.
 */
export function opposingPairVelocities(v1: number, left: ShotAnalysis, right: ShotAnalysis): OpposingPairVelocities | null {
  if (!(left.x < right.x)) return null;
  const toPlusX = left.right?.refracted[0];
  const toMinusX = right.left?.refracted[0];
  // A level branch (velocity null) has no finite apparent velocity to solve with.
  if (!toPlusX || !toMinusX || toPlusX.velocity === null || toMinusX.velocity === null) return null;
  // Shooting toward +x is shooting down-dip when θ (toward +x) is positive.
  const solved = slopeInterceptDip(v1, toPlusX.velocity, toMinusX.velocity);
  if (!solved) return null;
  const downDipIsPlusX = solved.dipDegrees >= 0;
  const ic = solved.criticalAngleDegrees / DEG;
  const theta = solved.dipDegrees / DEG;
  const depthUnderShots: OpposingPairVelocities['depthUnderShots'] = [];
  for (const [shot, line] of [
    [left, toPlusX],
    [right, toMinusX],
  ] as const) {
    // A negative intercept is a misfit, not a depth; leave that shot out.
    if (!(line.interceptMs >= 0)) continue;
    const normalDepth = (v1 * (line.interceptMs / 1000)) / (2 * Math.cos(ic));
    depthUnderShots.push({ shot: shot.id, normalDepth, verticalDepth: normalDepth / Math.cos(theta) });
  }
  return {
    shots: [left.id, right.id],
    downDipVelocity: downDipIsPlusX ? toPlusX.velocity : toMinusX.velocity,
    upDipVelocity: downDipIsPlusX ? toMinusX.velocity : toPlusX.velocity,
    trueVelocity: solved.trueVelocity,
    trueVelocityGentleDip: solved.trueVelocityGentleDip,
    dipDegrees: solved.dipDegrees,
    criticalAngleDegrees: solved.criticalAngleDegrees,
    depthUnderShots,
  };
}
