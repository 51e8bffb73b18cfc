/**
 * stations[].depthUncertainty (engine/depth/depth-uncertainty.ts: first-order propagation of
 * the combined T+ with its shared picks, V1 and V2; Bevington & Robinson 2003, ch. 3–4)
 * against a seeded Monte Carlo of the whole engine: 500 interpretations of each demo line
 * with independent Gaussian pick noise of 0.3 ms added to every pick (the reciprocal and
 * shot-position picks included), the spread of each station's depth over the runs. The
 * issue's check (issue 13): the analytic and the Monte Carlo standard deviations agree
 * within 15 % on the standard cases — here the median ratio over the stations of each line,
 * and every station covered by picks of opposing pairs within 25 % (the phantomed end
 * stations, whose phantoms share picks the propagation does not follow, within 35 %).
 * The depth spread is read at 0.001 m (unrounded depths from many runs); depthUncertainty is
 * rounded to 0.01 m, so a ratio carries up to ±5 % of rounding.
 */
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { demoLine, flatLine } from '../../engine/samples/demo-lines.js';
import type { Survey } from '../../engine/survey/survey.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

const RUNS = 500;
const SIGMA_MS = 0.3;

function monteCarlo(base: Survey, seed: number): { ratio: number; coverage: string }[] {
  const rng = mulberry32(seed);
  const depths: number[][] = base.geophones.map(() => []);
  const clean = interpret({ ...base, options: { residuals: false, pickUncertaintyMs: SIGMA_MS } });
  for (let r = 0; r < RUNS; r++) {
    const noisy: Survey = {
      ...base,
      options: { residuals: false, pickUncertaintyMs: SIGMA_MS },
      shots: base.shots.map((shot) => ({
        ...shot,
        times: shot.times.map((t, i) => (t === null || Math.abs(base.geophones[i].x - shot.x) < 1e-6 ? t : t + SIGMA_MS * gaussian(rng))),
      })),
    };
    interpret(noisy).stations.forEach((st, i) => {
      if (typeof st.depth === 'number') depths[i].push(st.depth);
    });
  }
  return clean.stations.flatMap((st, i) => {
    const d = depths[i];
    if (typeof st.depthUncertainty !== 'number' || d.length < RUNS * 0.9) return [];
    const mean = d.reduce((a, b) => a + b, 0) / d.length;
    const sd = Math.sqrt(d.reduce((a, b) => a + (b - mean) ** 2, 0) / (d.length - 1));
    return [{ ratio: st.depthUncertainty / sd, coverage: st.coverage ?? 'none' }];
  });
}

describe('depthUncertainty against a Monte Carlo of the whole engine (500 seeded runs, 0.3 ms picks)', () => {
  for (const [name, make, seed] of [['Demo B, flat refractor', flatLine, 99], ['Demo A, dipping refractor with off-end shots', demoLine, 101]] as const) {
    it(`${name}: the median ratio analytic/Monte Carlo within 15 %, each station within 25 % (phantomed ends 35 %)`, () => {
      const rows = monteCarlo(make(), seed);
      expect(rows.length).toBeGreaterThan(15);
      const sorted = rows.map((r) => r.ratio).sort((a, b) => a - b);
      const median = sorted[sorted.length >> 1];
      expect(Math.abs(median - 1)).toBeLessThanOrEqual(0.15);
      for (const r of rows) {
        const allowed = r.coverage === 'phantom' ? 0.35 : 0.25;
        expect(Math.abs(r.ratio - 1)).toBeLessThanOrEqual(allowed);
      }
    }, 60_000);
  }
});
