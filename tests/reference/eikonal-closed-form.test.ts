/**
 * The eikonal solver against closed-form first arrivals.
 * Sources of the formulas: direct wave t = r/V and the head wave over a flat or planar
 * dipping refractor, Kearey, Brooks & Hill, An Introduction to Geophysical Exploration,
 * 3rd ed., 2002, ch. 5; Telford, Geldart & Sheriff, Applied Geophysics, 2nd ed., 1990,
 * ch. 4 (as implemented in engine/forward/planar-refractor.ts).
 * Production grid: 0.25 m cells (DEFAULT_CELL_M).
 */
import { describe, expect, it } from 'vitest';
import { solveFirstArrivals, sampleTime } from '../../engine/forward/eikonal.js';
import { buildVelocityGrid, type LayeredModel } from '../../engine/forward/model.js';
import { DEFAULT_CELL_M } from '../../engine/forward/synthetic.js';
import { firstArrivalMs, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';

/** The accuracy the brief sets for the production grid: 0.5 % of the travel time. */
const MAX_RELATIVE_ERROR = 0.005;
const REFINEMENTS = [1, 0.5, 0.25, 0.125];

interface Errors {
  maxAbsMs: number;
  maxRel: number;
}

function planarModel(p: PlanarRefractorModel, xFar: number): LayeredModel {
  const tan = Math.tan((p.dipDegrees * Math.PI) / 180);
  return {
    surface: [{ x: 0, elevation: 0 }],
    layers: [
      { velocity: p.v1 },
      {
        velocity: p.v2,
        top: [
          { x: -xFar, elevation: p.refractorElevationAtZero + tan * xFar },
          { x: xFar, elevation: p.refractorElevationAtZero - tan * xFar },
        ],
      },
    ],
  };
}

/** Errors of the solver against firstArrivalMs for one shot and surface receivers. */
function planarErrors(p: PlanarRefractorModel, cellM: number, shotX: number, receiverXs: number[]): Errors {
  const grid = buildVelocityGrid(planarModel(p, 1000), { xMin: -2, xMax: 102, zMin: -30, zMax: 0, cellM });
  const source = { x: shotX, z: 0 };
  const times = solveFirstArrivals(grid, source);
  let maxAbsMs = 0;
  let maxRel = 0;
  for (const x of receiverXs) {
    const expected = firstArrivalMs(p, { x: shotX, elevation: 0 }, { x, elevation: 0 });
    const got = sampleTime(grid, times, x, 0, source);
    maxAbsMs = Math.max(maxAbsMs, Math.abs(got - expected));
    maxRel = Math.max(maxRel, Math.abs(got - expected) / expected);
  }
  return { maxAbsMs, maxRel };
}

function homogeneousErrors(cellM: number): Errors {
  const v = 1800;
  const model: LayeredModel = { surface: [{ x: 0, elevation: 0 }], layers: [{ velocity: v }] };
  const grid = buildVelocityGrid(model, { xMin: 0, xMax: 100, zMin: -40, zMax: 0, cellM });
  // Between nodes on purpose: the start must handle any source position.
  const source = { x: 20.37, z: -3.11 };
  const times = solveFirstArrivals(grid, source);
  let maxAbsMs = 0;
  let maxRel = 0;
  for (let x = 0; x <= 100; x += 2.5) {
    for (const z of [0, -7.3, -20, -39.5]) {
      const r = Math.hypot(x - source.x, z - source.z);
      if (r < 0.5) continue;
      const expected = (1000 * r) / v;
      const got = sampleTime(grid, times, x, z, source);
      maxAbsMs = Math.max(maxAbsMs, Math.abs(got - expected));
      maxRel = Math.max(maxRel, Math.abs(got - expected) / expected);
    }
  }
  return { maxAbsMs, maxRel };
}

/** Observed order of convergence over the refinements: log2(e_coarsest / e_finest) / steps. */
function observedOrder(errors: number[]): number {
  return Math.log2(errors[0] / errors[errors.length - 1]) / (errors.length - 1);
}

const receiversEvery1m = Array.from({ length: 100 }, (_, i) => i + 1);
/** Flat refractor 5.1 m down: between node rows at every refinement (5.1 / 0.125 is not whole). */
const flat: PlanarRefractorModel = { v1: 500, v2: 2000, refractorElevationAtZero: -5.1, dipDegrees: 0 };
/** Refractor 6 m under x = 0 dipping 5° toward +x. */
const dipping: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -6, dipDegrees: 5 };

describe('eikonal solver against closed forms (Kearey et al. 2002 ch. 5; Telford et al. 1990 ch. 4)', () => {
  it('homogeneous medium: t = r/V within 0.5 % at 0.25 m cells', () => {
    const e = homogeneousErrors(DEFAULT_CELL_M);
    expect(e.maxRel).toBeLessThan(MAX_RELATIVE_ERROR);
  });

  it('flat two-layer: direct wave and head wave on the surface within 0.5 % at 0.25 m cells', () => {
    const e = planarErrors(flat, DEFAULT_CELL_M, 0.3, receiversEvery1m);
    expect(e.maxRel).toBeLessThan(MAX_RELATIVE_ERROR);
  });

  it('flat two-layer: the head wave is there, not only the direct wave (far receivers arrive before x/V1)', () => {
    const grid = buildVelocityGrid(planarModel(flat, 1000), { xMin: -2, xMax: 102, zMin: -30, zMax: 0, cellM: DEFAULT_CELL_M });
    const source = { x: 0.3, z: 0 };
    const t = sampleTime(grid, solveFirstArrivals(grid, source), 100, 0, source);
    expect(t).toBeLessThan((1000 * 99.7) / flat.v1 / 2);
  });

  it('planar dipping refractor: down-dip and up-dip shots within 0.5 % at 0.25 m cells', () => {
    const down = planarErrors(dipping, DEFAULT_CELL_M, 0, receiversEvery1m);
    const up = planarErrors(dipping, DEFAULT_CELL_M, 100, receiversEvery1m.map((x) => x - 1));
    expect(down.maxRel).toBeLessThan(MAX_RELATIVE_ERROR);
    expect(up.maxRel).toBeLessThan(MAX_RELATIVE_ERROR);
  });

  it('error falls as the grid is refined (3 halvings, 1 m to 0.125 m) at the observed order we claim', () => {
    // Claim (measured, see docs/developers/forward.md): second-order stencils and a source start of
    // fixed size in metres give about order 1.6 in a uniform medium and 2 over a flat refractor;
    // a dipping refractor cuts cells obliquely, where the cell mixing is only first-order
    // right, and converges at about order 1. Asserted with a margin: 1.4, 1.4 and 0.9.
    const cases: { name: string; errors: number[]; minOrder: number }[] = [
      { name: 'homogeneous', errors: REFINEMENTS.map((h) => homogeneousErrors(h).maxAbsMs), minOrder: 1.4 },
      { name: 'flat', errors: REFINEMENTS.map((h) => planarErrors(flat, h, 0.3, receiversEvery1m).maxAbsMs), minOrder: 1.4 },
      { name: 'dipping', errors: REFINEMENTS.map((h) => planarErrors(dipping, h, 0, receiversEvery1m).maxAbsMs), minOrder: 0.9 },
    ];
    for (const { name, errors, minOrder } of cases) {
      const detail = `${name}: max errors ${errors.map((e) => e.toFixed(4)).join(', ')} ms`;
      for (let r = 1; r < errors.length; r++) expect(errors[r], detail).toBeLessThan(errors[r - 1]);
      expect(observedOrder(errors), detail).toBeGreaterThanOrEqual(minOrder);
    }
  });
});
