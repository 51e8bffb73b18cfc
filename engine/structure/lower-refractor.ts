/**
 * Dip of the second refractor of a three-layer line, tested as the first refractor's is
 * (structure-features.ts): one χ²-tested plane through the rock elevations (planarDip:
 * Draper & Smith 1998, ch. 2, at the 99 % level) and the line through them, with σ the
 * single-pair depth noise of the middle layer: the pick noise of a delay time,
 * σ·√3/2, converted to a thickness of the middle layer over the rock
 * (normalDepthFromDelayM with V2 and V3, as the first refractor uses V1 and V2).
 *
 * Steps in the rock surface are sought by depth/rock-steps.ts (a jump scan on the middle
 * layer's stripped delay with a Monte Carlo threshold); interpret puts its test here as
 * stepTest. The local line below is one piece over the whole mapped stretch.
 * Units: m, m/s, degrees. Pure; unrounded.
 */
import { normalDepthFromDelayM } from '../plus-minus/plus-minus.js';
import type { LocalDip } from './planar-dip.js';
import { refractorDips } from './structure-features.js';
import type { RockStepTest } from '../depth/rock-steps.js';

export interface LowerRefractorInput {
  xsM: number[];
  elevationM: number[];
  /** Vertical depth to the second refractor, m. */
  depthM: (number | null)[];
  /** Line velocities of the three layers, m/s (V1 < V2 < V3). */
  velocitiesMPerS: [number, number, number];
  pickSigmaMs: number;
}

export interface LowerRefractorStructure {
  /** The χ²-accepted plane through the rock elevations, degrees (positive deepening to +x) and RMS, m; null where no plane fits. */
  dip: { degrees: number; rmsM: number } | null;
  /** The line through the rock elevations over the whole mapped stretch (one piece, not split at rock steps). */
  local: LocalDip[];
  /** The Monte Carlo rock-step test (depth/rock-steps.ts), set by interpret; null where the line is too short for it. */
  stepTest?: RockStepTest | null;
}

/** Fewest rock depths for a dip (a line has two parameters, the test needs a degree of freedom). */
const MIN_DEPTHS = 3;

/** Dip of the second refractor (see the file comment). Cost: one planar fit over n stations, O(n). */
export function lowerRefractorStructure(input: LowerRefractorInput): LowerRefractorStructure {
  const [v1, v2, v3] = input.velocitiesMPerS;
  const none: LowerRefractorStructure = { dip: null, local: [] };
  if (!(v1 > 0 && v2 > v1 && v3 > v2)) return none;
  if (input.depthM.filter((d) => d !== null).length < MIN_DEPTHS) return none;
  const sigmaM = normalDepthFromDelayM((input.pickSigmaMs * Math.sqrt(3)) / 2, v2, v3) ?? 0.5;
  const elevations = input.depthM.map((d, i) => (d === null ? null : input.elevationM[i] - d));
  const dips = refractorDips(input.xsM, elevations, sigmaM, []);
  return { dip: dips.planar ? { degrees: dips.planar.degrees, rmsM: dips.planar.rmsM } : null, local: dips.local };
}
