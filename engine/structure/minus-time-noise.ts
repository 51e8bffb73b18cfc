/**
 * Noise of the combined minus times, the level the lateral-velocity detector tests against.
 */
import type { PairPlusMinus } from '../plus-minus/refractor-plus-times.js';
import { isSome } from '../shared/nan-none.js';

/**
 * Per-pick noise of the combined T−, ms. Pairs share shots, so averaging K pairs does not
 * divide the noise by √K: with nF distinct forward and nR distinct reverse shots at a
 * geophone, σ_T− = σ·√(1/nF + 1/nR). The upper median over the line, divided by √2 (the
 * detector works per pick); null where no geophone has both. Cost: O(geophones · pairs).
 */
export function minusTimeNoiseMs(pairs: PairPlusMinus[], geophoneCount: number, pickSigmaMs: number): number | null {
  const sigmas: number[] = [];
  for (let i = 0; i < geophoneCount; i++) {
    const covering = pairs.filter((p) => isSome(p.minusTimeMs[i]));
    const forward = new Set(covering.map((p) => p.left.id)).size;
    const reverse = new Set(covering.map((p) => p.right.id)).size;
    if (forward > 0 && reverse > 0) sigmas.push(pickSigmaMs * Math.sqrt(1 / forward + 1 / reverse));
  }
  if (sigmas.length === 0) return null;
  sigmas.sort((p, q) => p - q);
  return sigmas[sigmas.length >> 1] / Math.SQRT2;
}
