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
