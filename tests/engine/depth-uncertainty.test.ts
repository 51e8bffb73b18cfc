/**
 * The shared-pick variance of the combined T+ (engine/depth/depth-uncertainty.ts) taken shot
 * by shot equals the straightforward double sum Σ_p Σ_q w_p·w_q·C_pq / (Σw)² (Bevington &
 * Robinson 2003, ch. 4) on seeded random pair sets; and the first-order depth σ reduces to
 * the delay term alone when V1 and V2 are exact.
 */
import { describe, expect, it } from 'vitest';
import { depthUncertaintyM, plusSigmaWithSharedPicksMs, type SharingPair } from '../../engine/depth/depth-uncertainty.js';
import { normalDepthFromDelayM } from '../../engine/plus-minus/plus-minus.js';
import { mulberry32 } from '../helpers/random.js';

function doubleSum(pairs: SharingPair[], used: number[], i: number, sigma: number): number {
  let w = 0;
  let v = 0;
  for (const p of used) {
    const wp = 1 / (pairs[p].plusVarianceMs2[i] as number);
    w += wp;
    for (const q of used) {
      const wq = 1 / (pairs[q].plusVarianceMs2[i] as number);
      const shared = [pairs[p].left.id, pairs[p].right.id].filter((s) => s === pairs[q].left.id || s === pairs[q].right.id).length;
      v += wp * wq * (p === q ? (pairs[p].plusVarianceMs2[i] as number) : sigma * sigma * shared);
    }
  }
  return Math.sqrt(v) / w;
}

describe('depth uncertainty', () => {
  it('shot-by-shot shared-pick variance equals the double sum over pairs (200 random pair sets, 1e-12 relative)', () => {
    const rng = mulberry32(77);
    for (let t = 0; t < 200; t++) {
      const shots = 2 + Math.floor(10 * rng());
      const pairs: SharingPair[] = [];
      for (let a = 0; a < shots; a++) for (let b = a + 1; b < shots; b++) if (rng() < 0.6) pairs.push({ left: { id: `S${a}` }, right: { id: `S${b}` }, plusVarianceMs2: [0.2 + rng(), 0.2 + rng()] });
      if (pairs.length === 0) continue;
      const used = pairs.map((_, k) => k).filter(() => rng() < 0.8);
      if (used.length === 0) continue;
      const fast = plusSigmaWithSharedPicksMs(pairs, [used, used], 0.3);
      for (const i of [0, 1]) expect(Math.abs((fast[i] as number) - doubleSum(pairs, used, i, 0.3))).toBeLessThanOrEqual(1e-12 * doubleSum(pairs, used, i, 0.3));
    }
  });

  it('with exact velocities the depth σ is the delay term ∂z/∂δ·σδ (the plus-minus normal-depth factor)', () => {
    const sigma = depthUncertaintyM({ depthM: 6, delaySigmaMs: 0.2, v1: 600, v1SigmaMPerS: 0, v2: 2400, v2SigmaMPerS: 0 })!;
    expect(sigma).toBeCloseTo(normalDepthFromDelayM(0.2, 600, 2400)!, 12);
    // A V1 error adds in quadrature: larger, never smaller.
    expect(depthUncertaintyM({ depthM: 6, delaySigmaMs: 0.2, v1: 600, v1SigmaMPerS: 10, v2: 2400, v2SigmaMPerS: 0 })!).toBeGreaterThan(sigma);
  });
});
