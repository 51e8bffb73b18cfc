/**
 * Opposing (reversed) shot pairs for slope-intercept and plus-minus work: A left of B,
 * where A has a refracted branch on its right side (shooting toward +x), B one on its
 * left side (toward −x), and the x extents of those two first-refractor branches overlap,
 * so both branches see the same stretch of refractor.
 */
import type { ShotAnalysis } from '../output/interpretation.js';

/** All such pairs, ordered by the x of A, then of B. Inputs are not changed. */
export function opposingPairs(shots: ShotAnalysis[]): [ShotAnalysis, ShotAnalysis][] {
  const byX = [...shots].sort((a, b) => a.x - b.x);
  const pairs: [ShotAnalysis, ShotAnalysis][] = [];
  for (let i = 0; i < byX.length; i++) {
    const forward = byX[i].right?.refracted[0];
    if (!forward) continue;
    for (let j = i + 1; j < byX.length; j++) {
      const reverse = byX[j].left?.refracted[0];
      if (!reverse || !(byX[i].x < byX[j].x)) continue;
      const overlapFrom = Math.max(forward.fromX, reverse.fromX);
      const overlapTo = Math.min(forward.toX, reverse.toX);
      if (overlapFrom <= overlapTo) pairs.push([byX[i], byX[j]]);
    }
  }
  return pairs;
}
