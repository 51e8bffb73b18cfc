/**
 * Depths of the first refractor under every geophone for given V1 and V2 per station:
 * normal depths from the delay times (plus-minus.ts), vertical depths from the envelope of
 * the depth arcs and the arcs' feet (depth-arcs.ts), and the depth's standard deviation.
 */
import { normalDepthFromDelayM } from '../plus-minus/plus-minus.js';
import { arcFootPointsM, verticalDepthsFromArcsM } from './depth-arcs.js';

export interface DepthPass {
  /** Arc radius under each geophone, m. */
  normalDepthM: (number | null)[];
  /** Depth below each geophone to the envelope of the arcs, m. */
  verticalDepthM: (number | null)[];
  /** Where each arc touches the envelope. */
  feet: ReturnType<typeof arcFootPointsM>;
}

/** Normal depths (arc radii) and vertical depths (envelope of arcs) for given V1, V2. Cost: that of depth-arcs.ts. */
export function depthPass(
  xsM: number[],
  elevationM: number[],
  delayTimeMs: (number | null)[],
  v1At: (number | null)[],
  v2At: (number | null)[],
): DepthPass {
  const normalDepthM = delayTimeMs.map((d, i) => {
    const v1 = v1At[i];
    const v2 = v2At[i];
    if (d === null || v1 === null || v2 === null) return null;
    const z = normalDepthFromDelayM(d, v1, v2);
    return z !== null && z >= 0 ? z : null;
  });
  const arcs = xsM.map((x, i) => ({ xM: x, elevationM: elevationM[i], normalDepthM: normalDepthM[i] }));
  return { normalDepthM, verticalDepthM: verticalDepthsFromArcsM(arcs), feet: arcFootPointsM(arcs) };
}

/**
 * Standard deviation of a depth from that of its plus time, m: the depth formula applied
 * to σ_T+/2, σ_z = (σ_T+/2)·V1·V2/√(V2² − V1²) (linear in the delay time).
 */
export function depthSigmaM(plusSigmaMs: number | null, v1: number | null, v2: number | null): number | null {
  if (plusSigmaMs === null || v1 === null || v2 === null) return null;
  return normalDepthFromDelayM(plusSigmaMs / 2, v1, v2);
}

/**
 * Depth noise of a single opposing pair, m: T+ sums three picks, so σ_delay = σ·√3/2.
 * Without V1 and V2, 0.5 m (common practice for plus-minus depths).
 */
export function singlePairDepthSigmaM(pickSigmaMs: number, v1: number | null, v2: number | null): number {
  return (v1 !== null && v2 !== null ? normalDepthFromDelayM((pickSigmaMs * Math.sqrt(3)) / 2, v1, v2) : null) ?? 0.5;
}
