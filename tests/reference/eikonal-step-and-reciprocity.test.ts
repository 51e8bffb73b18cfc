/**
 * The eikonal solver where no closed form exists: a vertical step in the refractor, checked
 * against an independent expectation built from Fermat's principle (the first arrival is
 * the least time over all paths; here a brute-force minimum over the path geometry of each
 * family of straight legs and refractor runs), and reciprocity of travel times
 * (DESIGN.md, "Reciprocity": the time from A to B equals the time from B to A).
 * Head-wave geometry: Kearey, Brooks & Hill 2002, ch. 5; Telford et al. 1990, ch. 4.
 */
import { describe, expect, it } from 'vitest';
import { solveFirstArrivals, sampleTime } from '../../engine/forward/eikonal.js';
import { buildVelocityGrid, type LayeredModel } from '../../engine/forward/model.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import { DEFAULT_CELL_M } from '../../engine/forward/synthetic.js';

const V1 = 600;
const V2 = 2500;
/** Refractor 6 m down left of the step, 10 m down right of it (throw 4 m, deeper to +x). */
const STEP_X = 50;
const UPPER_Z = -6;
const LOWER_Z = -10;

const stepModel: LayeredModel = {
  surface: [{ x: 0, elevation: 0 }],
  layers: [
    { velocity: V1 },
    {
      velocity: V2,
      top: [
        { x: -1000, elevation: UPPER_Z },
        { x: STEP_X, elevation: UPPER_Z },
        { x: STEP_X, elevation: LOWER_Z },
        { x: 1000, elevation: LOWER_Z },
      ],
    },
  ],
};

const dist = (x0: number, z0: number, x1: number, z1: number): number => Math.hypot(x1 - x0, z1 - z0);

/** Parameter samples from lo to hi every step, both ends included. */
function samples(lo: number, hi: number, step: number): number[] {
  const out: number[] = [];
  for (let x = lo; x < hi; x += step) out.push(x);
  out.push(hi);
  return out;
}

/** True when a straight leg from the surface point (xs, 0) to (x, z) stays in layer 1. */
function slowLegValid(xs: number, x: number, z: number): boolean {
  // Layer 1 is z > UPPER_Z left of the step and z > LOWER_Z right of it; a leg ending right of
  // the step on the lower refractor must pass the step above its upper corner.
  if ((xs - STEP_X) * (x - STEP_X) >= 0) return true;
  const zAtStep = (z * (STEP_X - xs)) / (x - xs);
  return zAtStep >= UPPER_Z;
}

/**
 * Least time (ms) from surface point s to surface point r (s < r) by Fermat's principle,
 * over the direct ray and every path of straight slow legs joined by runs in the refractor:
 * along the upper refractor; along the lower one; or down to the upper refractor, through
 * layer 2 to the step's lower corner and along the lower refractor. Runs in layer 2 are
 * shortest paths inside it (straight, or around the corner). Every leg is checked to stay
 * in its layer. Minimised by brute force over entry and exit points every 5 mm from x = −10 to 110 m
 * (the receivers lie from 2 to 98 m, so no least-time path leaves that range).
 */
function fermatTimeMs(s: number, r: number): number {
  const step = 0.005; // m
  let best = dist(s, 0, r, 0) / V1;
  // Upper refractor: entry a ≤ exit e ≤ STEP_X.
  {
    let prefixMin = Infinity;
    for (const x of samples(-10, STEP_X, step)) {
      prefixMin = Math.min(prefixMin, dist(s, 0, x, UPPER_Z) / V1 - x / V2);
      best = Math.min(best, prefixMin + x / V2 + dist(x, UPPER_Z, r, 0) / V1);
    }
  }
  // Lower refractor alone: entry a ≤ exit e, both ≥ STEP_X, legs passing above the step.
  {
    let prefixMin = Infinity;
    for (const x of samples(STEP_X, 110, step)) {
      if (slowLegValid(s, x, LOWER_Z)) prefixMin = Math.min(prefixMin, dist(s, 0, x, LOWER_Z) / V1 - x / V2);
      if (slowLegValid(r, x, LOWER_Z)) best = Math.min(best, prefixMin + x / V2 + dist(x, LOWER_Z, r, 0) / V1);
    }
  }
  // Upper refractor, through layer 2 round the lower corner, lower refractor.
  // (s may lie past the step too: its down leg then runs back over the step to the upper refractor.)
  if (r > STEP_X) {
    let down = Infinity;
    for (const a of samples(-10, STEP_X, step)) {
      down = Math.min(down, dist(s, 0, a, UPPER_Z) / V1 + dist(a, UPPER_Z, STEP_X, LOWER_Z) / V2);
    }
    let up = Infinity;
    for (const e of samples(STEP_X, 110, step)) up = Math.min(up, (e - STEP_X) / V2 + dist(e, LOWER_Z, r, 0) / V1);
    best = Math.min(best, down + up);
  }
  return 1000 * best;
}

describe('eikonal solver across a vertical step in the refractor (Fermat by brute force)', () => {
  const grid = buildVelocityGrid(stepModel, { xMin: -2, xMax: 102, zMin: -20, zMax: 0, cellM: DEFAULT_CELL_M });
  const receivers = samples(2, 98, 2);

  it('shot on the shallow side: times past the step agree with the least-time paths within 0.5 %', () => {
    const source = { x: 0, z: 0 };
    const times = solveFirstArrivals(grid, source);
    let worst = 0;
    for (const x of receivers) {
      const expected = fermatTimeMs(0, x);
      const got = sampleTime(grid, times, x, 0, source);
      worst = Math.max(worst, Math.abs(got - expected) / expected);
    }
    expect(worst).toBeLessThan(0.005);
  });

  it('shot on the deep side: times agree with the least-time paths within 0.5 %', () => {
    const source = { x: 100, z: 0 };
    const times = solveFirstArrivals(grid, source);
    let worst = 0;
    for (const x of receivers) {
      const expected = fermatTimeMs(x, 100); // least time is symmetric in its ends
      const got = sampleTime(grid, times, x, 0, source);
      worst = Math.max(worst, Math.abs(got - expected) / expected);
    }
    expect(worst).toBeLessThan(0.005);
  });

  it('the step shows: past it, arrivals are later than over an unbroken shallow refractor by about Δz·cos(ic)/V1', () => {
    // DESIGN.md, "Step in the refractor": refracted arrivals past a step jump by about Δz·cos(ic)/V1.
    const source = { x: 0, z: 0 };
    const got = sampleTime(grid, solveFirstArrivals(grid, source), 96, 0, source);
    const cosIc = Math.cos(Math.asin(V1 / V2));
    const unbroken = (1000 * 96) / V2 + (1000 * 2 * -UPPER_Z * cosIc) / V1;
    const jump = (1000 * (UPPER_Z - LOWER_Z) * cosIc) / V1;
    expect(got - unbroken).toBeGreaterThan(0.8 * jump);
    expect(got - unbroken).toBeLessThan(1.2 * jump);
  });
});

describe('reciprocity (DESIGN.md; Telford et al. 1990 ch. 4): t(A→B) = t(B→A)', () => {
  it('holds within the discretisation error over topography, a dipping refractor with a step, and a lateral velocity change', () => {
    const model: LayeredModel = {
      surface: [
        { x: -5, elevation: 100 },
        { x: 30, elevation: 104 },
        { x: 60, elevation: 101.5 },
        { x: 105, elevation: 106 },
      ],
      layers: [
        { velocity: { contactsX: [45], velocities: [550, 700] } },
        {
          velocity: { contactsX: [70], velocities: [2300, 3100] },
          top: [
            { x: -5, elevation: 95 },
            { x: 52, elevation: 92 },
            { x: 52.3, elevation: 89 },
            { x: 105, elevation: 91 },
          ],
        },
      ],
    };
    const grid = buildVelocityGrid(model, { xMin: -5, xMax: 105, zMin: 80, zMax: 108, cellM: DEFAULT_CELL_M });
    const points = [0, 13.7, 41, 66.6, 100].map((x) => ({ x, z: elevationAt(model.surface, x) }));
    const fields = points.map((p) => solveFirstArrivals(grid, p));
    let worstMs = 0;
    let worstRel = 0;
    for (let a = 0; a < points.length; a++) {
      for (let b = a + 1; b < points.length; b++) {
        const ab = sampleTime(grid, fields[a], points[b].x, points[b].z, points[a]);
        const ba = sampleTime(grid, fields[b], points[a].x, points[a].z, points[b]);
        worstMs = Math.max(worstMs, Math.abs(ab - ba));
        worstRel = Math.max(worstRel, Math.abs(ab - ba) / Math.min(ab, ba));
      }
    }
    expect(worstRel).toBeLessThan(0.003);
    expect(worstMs).toBeLessThan(0.1);
  });
});
