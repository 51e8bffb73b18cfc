/**
 * Depths to three (or more) flat-lying refractors by layer stripping.
 *
 * For flat layers of thickness h_i and velocity V_i, the delay time of refractor n (the
 * top of layer n+1, velocity V_{n+1}) at a surface point is
 *   t_n = Σ_{i=1..n} h_i·cos(θ_{i,n+1}) / V_i,   sin θ_{i,n+1} = V_i / V_{n+1},
 * and the intercept time of its head-wave branch is twice that (Kearey, Brooks & Hill,
 * An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5, multi-layer case;
 * Telford, Geldart & Sheriff, Applied Geophysics, 2nd ed., 1990, ch. 4; Palmer, The
 * Generalized Reciprocal Method, SEG, 1980, for the time-depth view). Layer stripping
 * solves it from the top down:
 *   h_n = [t_n − Σ_{i<n} h_i·cos(θ_{i,n+1})/V_i] · V_n / cos(θ_{n,n+1}).
 * Units: delay and intercept times in ms, velocities in m/s, thicknesses and depths in m.
 *
 * Returns null, never NaN, where the formulas have no answer: a velocity inversion
 * (a deeper velocity not above the one over it: the slow layer gives no head wave and
 * the critical angle does not exist) or a negative thickness (delay times that no set of
 * flat layers with these velocities produces). hidden-layer.ts words the warnings.
 */
import { StructureInputError } from '../structure/structure-input.js';

export interface StrippedLayers {
  /** Thickness of layers 1..n above each refractor, top first, m. */
  thicknessesM: number[];
  /** Depth to each refractor, top first, m. */
  depthsM: number[];
}

function checkInput(timesMs: readonly number[], velocitiesMPerS: readonly number[], timesField: string): void {
  if (!Array.isArray(timesMs) || timesMs.length === 0) throw new StructureInputError(timesField, 'must be a non-empty array of times in ms, one per refractor');
  if (!Array.isArray(velocitiesMPerS) || velocitiesMPerS.length !== timesMs.length + 1) {
    throw new StructureInputError('velocitiesMPerS', `must hold one velocity per layer (${timesMs.length + 1} for ${timesMs.length} refractors), got ${Array.isArray(velocitiesMPerS) ? velocitiesMPerS.length : String(velocitiesMPerS)}`);
  }
  timesMs.forEach((t, i) => {
    if (typeof t !== 'number' || !Number.isFinite(t) || t < 0) throw new StructureInputError(`${timesField}[${i}]`, `must be a finite time ≥ 0 ms, got ${String(t)}`);
  });
  velocitiesMPerS.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new StructureInputError(`velocitiesMPerS[${i}]`, `must be a positive velocity in m/s, got ${String(v)}`);
  });
}

/** cos θ with sin θ = vUpper/vLower; only called with vUpper < vLower. */
function cosCritical(vUpper: number, vLower: number): number {
  const s = vUpper / vLower;
  return Math.sqrt(1 - s * s);
}

/**
 * Thicknesses and depths from the delay time to each refractor (top first) and the layer
 * velocities V1..V(n+1). null on a velocity inversion or an impossible (negative) thickness.
 */
export function stripLayers(delayTimesMs: number[], velocitiesMPerS: number[]): StrippedLayers | null {
  checkInput(delayTimesMs, velocitiesMPerS, 'delayTimesMs');
  for (let i = 1; i < velocitiesMPerS.length; i++) if (!(velocitiesMPerS[i] > velocitiesMPerS[i - 1])) return null;
  const thicknessesM: number[] = [];
  const depthsM: number[] = [];
  let depth = 0;
  for (let n = 0; n < delayTimesMs.length; n++) {
    const vBelow = velocitiesMPerS[n + 1];
    let upper = 0;
    for (let i = 0; i < n; i++) upper += (thicknessesM[i] * cosCritical(velocitiesMPerS[i], vBelow)) / velocitiesMPerS[i];
    const remainingS = delayTimesMs[n] / 1000 - upper;
    const h = (remainingS * velocitiesMPerS[n]) / cosCritical(velocitiesMPerS[n], vBelow);
    // A thickness a rounding error below zero is a layer pinching out; clearly negative is no answer.
    if (h < -1e-9 * Math.max(1, depth)) return null;
    const hClamped = Math.max(0, h);
    thicknessesM.push(hClamped);
    depth += hClamped;
    depthsM.push(depth);
  }
  return { thicknessesM, depthsM };
}

/**
 * The same from shot intercept times (ms, top refractor first): an intercept time is
 * twice the delay time under a flat-layered shot point (Kearey et al. 2002 ch. 5).
 */
export function thicknessesFromInterceptTimes(interceptTimesMs: number[], velocitiesMPerS: number[]): StrippedLayers | null {
  checkInput(interceptTimesMs, velocitiesMPerS, 'interceptTimesMs');
  return stripLayers(interceptTimesMs.map((t) => t / 2), velocitiesMPerS);
}
