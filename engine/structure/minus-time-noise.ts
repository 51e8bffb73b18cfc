/**
 * Noise of the combined minus times, the level the lateral-velocity detector tests against.
 */
import type { PairPlusMinus } from '../plus-minus/refractor-plus-times.js';
import { isSome } from '../shared/nan-none.js';
import { zeros, type Doubles } from '../shared/zeros.js';

/**
 * Per-pick noise of the combined T−, ms. Pairs share shots, so averaging K pairs does not
 * divide the noise by √K: with nF distinct forward and nR distinct reverse shots at a
 * geophone, σ_T− = σ·√(1/nF + 1/nR). The upper median over the line, divided by √2 (the
 * detector works per pick); null where no geophone has both. Cost: O(geophones · pairs), no
 * allocation per geophone.
 */
export function minusTimeNoiseMs(pairs: PairPlusMinus[], geophoneCount: number, pickSigmaMs: number): number | null {
  // Shots numbered once; at each geophone a shot counts once, marked with the geophone's
  // number (no set or filtered list per geophone). O(K) to number, O(N·K) to count.
  const leftIndex = shotNumbers(pairs.map((p) => p.left.id));
  const rightIndex = shotNumbers(pairs.map((p) => p.right.id));
  const leftSeen = zeros(pairs.length).fill(-1);
  const rightSeen = zeros(pairs.length).fill(-1);
  const sigmas: number[] = [];
  for (let i = 0; i < geophoneCount; i++) {
    let forward = 0;
    let reverse = 0;
    for (let k = 0; k < pairs.length; k++) {
      if (!isSome(pairs[k].minusTimeMs[i])) continue;
      const l = leftIndex[k];
      const r = rightIndex[k];
      if (leftSeen[l] !== i) {
        leftSeen[l] = i;
        forward++;
      }
      if (rightSeen[r] !== i) {
        rightSeen[r] = i;
        reverse++;
      }
    }
    if (forward > 0 && reverse > 0) sigmas.push(pickSigmaMs * Math.sqrt(1 / forward + 1 / reverse));
  }
  if (sigmas.length === 0) return null;
  sigmas.sort((p, q) => p - q);
  return sigmas[sigmas.length >> 1] / Math.SQRT2;
}

/** Each id's number in order of first appearance, per position. O(n). */
function shotNumbers(ids: string[]): Doubles {
  const numbers = new Map<string, number>();
  const out = zeros(ids.length);
  ids.forEach((id, k) => {
    let n = numbers.get(id);
    if (n === undefined) {
      n = numbers.size;
      numbers.set(id, n);
    }
    out[k] = n;
  });
  return out;
}
