/**
 * Top-layer velocity V1 from the direct-wave picks, t = x / V1 (Kearey, Brooks & Hill 2002,
 * ch. 5). Two robust steps: each shot side's direct picks give a slowness by the Theil–Sen
 * estimator (median pairwise slope, theil-sen.ts), and V1 is the median of the per-side
 * velocities. One wild pick on a side, or one odd side on the line, does not move it.
 * Offsets are horizontal distances along the line (elevation ignored). Units: m, ms, m/s.
 */
import { median } from 'simple-statistics';
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import { theilSenSlope } from './theil-sen.js';

export function topLayerVelocity(
  shots: ShotAnalysis[],
  survey: Survey,
): { velocity: number | null; perSide: { shot: string; side: 'left' | 'right'; velocity: number }[] } {
  const perSide: { shot: string; side: 'left' | 'right'; velocity: number }[] = [];
  for (const analysis of shots) {
    const shot = survey.shots.find((s) => s.id === analysis.id);
    if (!shot) continue;
    for (const side of ['left', 'right'] as const) {
      const offsets: number[] = [];
      const times: number[] = [];
      survey.geophones.forEach((g, i) => {
        const t = shot.times[i];
        if (analysis.branchOfPick[i] !== 0 || t === null || t === undefined) return;
        const d = g.x - shot.x;
        if (side === 'left' ? d < 0 : d > 0) {
          offsets.push(Math.abs(d));
          times.push(t);
        }
      });
      const slownessMsPerM = theilSenSlope(offsets, times);
      // A direct branch must slow down with offset; zero or negative slopes are not velocities.
      if (slownessMsPerM !== null && slownessMsPerM > 0) perSide.push({ shot: analysis.id, side, velocity: 1000 / slownessMsPerM });
    }
  }
  return { velocity: perSide.length ? median(perSide.map((p) => p.velocity)) : null, perSide };
}
