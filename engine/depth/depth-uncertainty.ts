/**
 * One standard deviation of the depth under each geophone (stations[].depthUncertainty),
 * propagated to first order from the three quantities a plus-minus depth rests on
 * (Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., 2003, ch. 3):
 *   z = δ·V1·V2/√(V2² − V1²),  δ = T+/2,
 *   σz² = (∂z/∂δ·σδ)² + (z·k1·σV1/V1)² + (z·k2·σV2/V2)²,  k1 = V2²/(V2² − V1²), k2 = V1²/(V2² − V1²),
 * the three errors taken as independent (the direct-wave picks that fix V1 are not the
 * head-wave picks that fix δ; V2 comes from T−, in which each pair's tAB cancels).
 * σδ is the combined T+'s, counting the picks that several pairs share: pairs with a shot
 * in common both use that shot's pick at the geophone, so their T+ are correlated, and
 * the inverse-variance mean's variance is
 *   Var = Σ_p Σ_q w_p·w_q·C_pq / (Σ w)²,  C_pp = var_p,  C_pq = σ²·(shots p and q share),
 * (the same reference, ch. 4, for the mean; the cross terms are what the independent
 * formula 1/Σw leaves out: measured 0.57–0.79 of a Monte Carlo spread without them).
 * Cost O(Σ_i K_i) for K_i pairs at geophone i. Units: m, ms, m/s.
 */
import { isSome } from '../shared/nan-none.js';

/** What a pair brings to the combination at a geophone: its shots and T+ variances (the weights). */
export interface SharingPair {
  left: { id: string };
  right: { id: string };
  plusVarianceMs2: ArrayLike<number>;
}

/**
 * σ of the combined T+ at each geophone with the shared picks counted, ms; null where no pair
 * contributes. The double sum is taken shot by shot: Σ_{p≠q} w_p·w_q·shared(p, q) =
 * Σ_s W_s² − 2·Σ_p w_p², W_s the weight of the pairs that use shot s (each pair uses two
 * shots, so p = q counts twice in Σ_s W_s²). O(K) at a geophone of K pairs, not O(K²): a
 * 64-shot line has about 2,000 pairs.
 */
export function plusSigmaWithSharedPicksMs(pairs: readonly SharingPair[], contributing: readonly number[][], pickSigmaMs: number): (number | null)[] {
  const s2 = pickSigmaMs * pickSigmaMs;
  const byShot = new Map<string, number>();
  return contributing.map((used, i) => {
    if (used.length === 0) return null;
    byShot.clear();
    let w = 0;
    let own = 0;
    let squares = 0;
    for (const p of used) {
      const vp = pairs[p].plusVarianceMs2[i];
      if (!isSome(vp) || !(vp > 0)) continue;
      const wp = 1 / vp;
      w += wp;
      own += wp * wp * vp;
      squares += wp * wp;
      const { left, right } = pairs[p];
      byShot.set(left.id, (byShot.get(left.id) ?? 0) + wp);
      byShot.set(right.id, (byShot.get(right.id) ?? 0) + wp);
    }
    if (!(w > 0)) return null;
    let shared = -2 * squares;
    for (const ws of byShot.values()) shared += ws * ws;
    return Math.sqrt(own + s2 * Math.max(0, shared)) / w;
  });
}

export interface DepthUncertaintyInput {
  /** The depth itself, m (the V1 and V2 terms scale with it). */
  depthM: number | null;
  delaySigmaMs: number | null;
  v1: number | null;
  v1SigmaMPerS: number | null;
  v2: number | null;
  v2SigmaMPerS: number | null;
}

/** σ of one depth, m (see the file comment): the delay term as ∂z/∂δ·σδ, the velocity terms relative to z; null without a depth, σδ or velocities. */
export function depthUncertaintyM(input: DepthUncertaintyInput): number | null {
  const { depthM: z, delaySigmaMs: sd, v1, v2 } = input;
  if (z === null || sd === null || v1 === null || v2 === null || !(v2 > v1) || !(z >= 0)) return null;
  const denominator = v2 * v2 - v1 * v1;
  const metresPerMs = (v1 * v2) / (1000 * Math.sqrt(denominator));
  const fromDelay = sd * metresPerMs;
  const fromV1 = (z * (v2 * v2) * (input.v1SigmaMPerS ?? 0)) / (denominator * v1);
  const fromV2 = (z * (v1 * v1) * (input.v2SigmaMPerS ?? 0)) / (denominator * v2);
  return Math.sqrt(fromDelay * fromDelay + fromV1 * fromV1 + fromV2 * fromV2);
}
