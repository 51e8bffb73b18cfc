/**
 * Survey documents for the benchmark: flat two-layer lines whose picks are the closed-form
 * first arrivals (engine/forward/planar-refractor.ts; Kearey, Brooks & Hill 2002, ch. 5),
 * rounded to 0.1 ms, no noise. Invented geometry: 3 m spacing, V1 600 m/s over V2 2400 m/s
 * at 8 m depth, level ground at 100 m.
 */
import { firstArrivalMs, type PlanarRefractorModel } from '../engine/forward/planar-refractor.js';
import type { Survey } from '../engine/survey/survey.js';

const MODEL: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 0 };
const SPACING_M = 3;
const GROUND_M = 100;

function pick(shotX: number, geophoneX: number): number {
  const t = firstArrivalMs(MODEL, { x: shotX, elevation: GROUND_M }, { x: geophoneX, elevation: GROUND_M });
  return Math.round(t * 10) / 10;
}

/**
 * A flat line of `geophones` geophones and `shots` shots (at least 5): two off-end shots
 * 30 m beyond the ends, two end shots half a spacing outside, the rest spread evenly
 * between geophones inside the spread. Every shot is recorded by every geophone.
 */
export function flatBenchLine(geophones: number, shots: number): Survey {
  const xs = Array.from({ length: geophones }, (_, i) => i * SPACING_M);
  const last = xs[xs.length - 1];
  const shotXs = [-30, -SPACING_M / 2, last + SPACING_M / 2, last + 30];
  const inner = shots - 4;
  for (let k = 1; k <= inner; k++) {
    // Between two geophones, so no shot sits on a geophone (Cost O(1) per shot).
    const i = Math.round((k * (geophones - 1)) / (inner + 1));
    shotXs.push(xs[Math.min(i, geophones - 2)] + SPACING_M / 2);
  }
  shotXs.sort((a, b) => a - b);
  return {
    name: `bench flat ${geophones} geophones, ${shots} shots`,
    geophones: xs.map((x) => ({ x, elevation: GROUND_M })),
    shots: shotXs.map((sx, k) => ({ id: `S${k + 1}`, x: sx, elevation: GROUND_M, times: xs.map((x) => pick(sx, x)) })),
  };
}

/**
 * A rolling line: `geophones` positions, `shots` shots spread evenly along it, each
 * recorded only by the `active` geophones nearest to it (null elsewhere), as when a
 * spread is rolled along a long line.
 */
export function rollingBenchLine(geophones: number, shots: number, active: number): Survey {
  const xs = Array.from({ length: geophones }, (_, i) => i * SPACING_M);
  const last = xs[xs.length - 1];
  const shotXs = Array.from({ length: shots }, (_, k) => -SPACING_M / 2 + (k * (last + SPACING_M)) / (shots - 1));
  return {
    name: `bench rolling ${geophones} geophones, ${shots} shots, ${active} live`,
    geophones: xs.map((x) => ({ x, elevation: GROUND_M })),
    shots: shotXs.map((sx, k) => {
      const centre = Math.min(Math.max(Math.round(sx / SPACING_M) - active / 2, 0), geophones - active);
      return {
        id: `R${k + 1}`,
        x: sx,
        elevation: GROUND_M,
        times: xs.map((x, i) => (i >= centre && i < centre + active ? pick(sx, x) : null)),
      };
    }),
  };
}

/** A flat two-layer line at the survey limits: 1,024 geophones at 2 m, 64 shots spread evenly. */
export function maximumBenchLine(): Survey {
  const geophones = Array.from({ length: 1024 }, (_, i) => ({ x: 2 * i, elevation: 100 }));
  const last = geophones[geophones.length - 1].x;
  const v1 = 600;
  const v2 = 2400;
  const depth = 6;
  const ic = Math.asin(v1 / v2);
  const shots = Array.from({ length: 64 }, (_, k) => {
    const x = -1 + ((last + 2) * k) / 63;
    // Closed-form first arrivals over a flat refractor (Kearey, Brooks & Hill 2002, ch. 5).
    const times = geophones.map((g) => {
      const offset = Math.abs(g.x - x);
      const direct = (offset / v1) * 1000;
      const head = (offset / v2 + (2 * depth * Math.cos(ic)) / v1) * 1000;
      return Math.round(Math.min(direct, head) * 100) / 100;
    });
    return { id: `S${k}`, x, elevation: 100, times };
  });
  return { name: 'benchmark: maximum line', geophones, shots, options: { residuals: false } };
}
