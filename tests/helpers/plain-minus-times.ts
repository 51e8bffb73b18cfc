/**
 * The plain forms of combineWeighted and combineMinusTimes (engine/plus-minus/plus-minus.ts)
 * as they were before issue 9: every pair added recombines the whole profile (O(K²·N) for
 * K pairs and N geophones). Kept only so that tests/engine/combine-minus-times.test.ts can
 * compare the running-sum forms with them on seeded random data.
 */
import type { WeightedCombination } from '../../engine/plus-minus/plus-minus.js';

function isTime(value: number | null | undefined): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/** Inverse-variance mean, σ, count and χ² per geophone, one geophone at a time. */
export function plainCombineWeighted(values: (number | null)[][], variances: (number | null)[][], geophoneCount: number): WeightedCombination {
  const out: WeightedCombination = { valueMs: [], sigmaMs: [], pairCount: [], chiSquare: [] };
  for (let i = 0; i < geophoneCount; i++) {
    let sw = 0;
    let swv = 0;
    const used: [number, number][] = [];
    values.forEach((pair, k) => {
      const v = pair[i];
      const variance = variances[k]?.[i];
      if (!isTime(v) || !isTime(variance) || !(variance > 0)) return;
      sw += 1 / variance;
      swv += v / variance;
      used.push([v, 1 / variance]);
    });
    const mean = sw > 0 ? swv / sw : null;
    out.valueMs.push(mean);
    out.sigmaMs.push(sw > 0 ? 1 / Math.sqrt(sw) : null);
    out.pairCount.push(used.length);
    out.chiSquare.push(mean !== null && used.length > 1 ? used.reduce((s, [v, w]) => s + w * (v - mean) ** 2, 0) : null);
  }
  return out;
}

/** Minus times on one datum, recombining the profile built so far for every pair added. */
export function plainCombineMinusTimes(values: (number | null)[][], variances: (number | null)[][], geophoneCount: number): WeightedCombination {
  const has = (k: number, i: number): boolean => isTime(values[k][i]) && isTime(variances[k][i]) && (variances[k][i] as number) > 0;
  const count = (k: number): number => values[k].filter((_, i) => has(k, i)).length;
  const order = values.map((_, k) => k).filter((k) => count(k) > 0).sort((p, q) => count(q) - count(p) || p - q);
  if (order.length === 0) return plainCombineWeighted([], [], geophoneCount);
  const shifted: (number | null)[][] = [values[order[0]]];
  const shiftedVar: (number | null)[][] = [variances[order[0]]];
  const pending = order.slice(1);
  while (pending.length > 0) {
    const current = plainCombineWeighted(shifted, shiftedVar, geophoneCount).valueMs;
    let best = -1;
    let bestOverlap = 0;
    pending.forEach((k, j) => {
      const overlap = current.filter((c, i) => c !== null && has(k, i)).length;
      if (overlap > bestOverlap) {
        bestOverlap = overlap;
        best = j;
      }
    });
    if (best < 0) break;
    const k = pending.splice(best, 1)[0];
    let sw = 0;
    let swd = 0;
    current.forEach((c, i) => {
      if (c === null || !has(k, i)) return;
      const w = 1 / (variances[k][i] as number);
      sw += w;
      swd += w * ((values[k][i] as number) - c);
    });
    const offset = swd / sw;
    shifted.push(values[k].map((v) => (isTime(v) ? v - offset : null)));
    shiftedVar.push(variances[k]);
  }
  return plainCombineWeighted(shifted, shiftedVar, geophoneCount);
}
