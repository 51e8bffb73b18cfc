import { describe, expect, it } from 'vitest';
import {
  buildVelocityGrid,
  checkModel,
  layerIndexAt,
  lateralVelocityFromStations,
  layerVelocityAt,
  ModelError,
  type LayeredModel,
} from '../../../engine/forward/model.js';
import { elevationAt } from '../../../engine/forward/polyline.js';
import { GridError, MAX_GRID_NODES } from '../../../engine/forward/velocity-grid.js';

const stepTop = [
  { x: 0, elevation: -5 },
  { x: 10, elevation: -5 },
  { x: 10, elevation: -8 },
  { x: 20, elevation: -8 },
];

describe('elevationAt', () => {
  it('interpolates linearly, holds the end values beyond the ends, and takes the value after a vertical step', () => {
    const line = [{ x: 0, elevation: 0 }, { x: 10, elevation: 5 }];
    expect(elevationAt(line, 4)).toBeCloseTo(2, 12);
    expect(elevationAt(line, -3)).toBe(0);
    expect(elevationAt(line, 30)).toBe(5);
    expect(elevationAt(stepTop, 9.999)).toBe(-5);
    expect(elevationAt(stepTop, 10)).toBe(-8);
  });
});

describe('layers and velocities', () => {
  const model: LayeredModel = {
    surface: [{ x: 0, elevation: 0 }],
    layers: [
      { velocity: 500 },
      { velocity: 1500, top: [{ x: 0, elevation: -3 }] },
      // A deeper layer that rises above the one over it at x > 15 cuts it off there.
      { velocity: 3000, top: [{ x: 0, elevation: -10 }, { x: 20, elevation: -1 }] },
    ],
  };

  it('puts a point in the deepest layer whose top is above it, and in the air above the surface', () => {
    expect(layerIndexAt(model, 5, 1)).toBe(-1);
    expect(layerIndexAt(model, 5, -1)).toBe(0);
    expect(layerIndexAt(model, 5, -4)).toBe(1);
    expect(layerIndexAt(model, 5, -9)).toBe(2);
    expect(layerIndexAt(model, 19, -2)).toBe(2);
  });

  it('reads piecewise-constant lateral velocities, right-continuous at contacts', () => {
    const v = { contactsX: [10, 20], velocities: [1, 2, 3] };
    expect(layerVelocityAt(v, 9.9)).toBe(1);
    expect(layerVelocityAt(v, 10)).toBe(2);
    expect(layerVelocityAt(v, 25)).toBe(3);
  });

  it('builds lateral velocities from one value per station with contacts halfway between', () => {
    expect(lateralVelocityFromStations([0, 2, 6], [500, 520, 560])).toEqual({ contactsX: [1, 4], velocities: [500, 520, 560] });
    expect(() => lateralVelocityFromStations([0, 2], [500])).toThrow(RangeError);
  });
});

describe('buildVelocityGrid', () => {
  const model: LayeredModel = {
    surface: [{ x: 0, elevation: 0 }],
    layers: [{ velocity: 500 }, { velocity: 2000, top: [{ x: -100, elevation: -2.25 }, { x: 100, elevation: -2.25 }] }],
  };

  it('gives pure cells their slowness, air above the ground skin, and a cut cell the mixing rule of model.ts', () => {
    const g = buildVelocityGrid(model, { xMin: 0, xMax: 4, zMin: -4, zMax: 2, cellM: 1 });
    const cell = (i: number, j: number): number => g.cellSlownessMsPerM[j * (g.nx - 1) + i];
    expect(g.nx).toBe(5);
    expect(g.nz).toBe(7);
    expect(cell(1, 0)).toBeCloseTo(0.5, 12); // −4..−3: layer 2
    expect(cell(1, 3)).toBeCloseTo(2, 12); // −1..0: layer 1
    expect(cell(1, 4)).toBeCloseTo(2, 12); // 0..1: skin, surface material
    expect(cell(1, 5)).toBeCloseTo(2, 12); // 1..2: skin (2 cells)
    // −3..−2: a quarter layer 1 above −2.25, three quarters layer 2:
    // s² = s2² + (¼·√(s1² − s2²))²
    const s1 = 2;
    const s2 = 0.5;
    expect(cell(1, 1)).toBeCloseTo(Math.sqrt(s2 * s2 + (0.25 * Math.sqrt(s1 * s1 - s2 * s2)) ** 2), 12);
  });

  it('marks cells above the skin as air', () => {
    const g = buildVelocityGrid(model, { xMin: 0, xMax: 4, zMin: -4, zMax: 4, cellM: 1 });
    expect(g.cellSlownessMsPerM[6 * (g.nx - 1) + 1]).toBe(Infinity);
  });

  it('refuses a grid above the node limit with an error naming the cell size', () => {
    let caught: unknown = null;
    try {
      buildVelocityGrid(model, { xMin: 0, xMax: 4000, zMin: -1000, zMax: 0, cellM: 0.5 });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(GridError);
    expect((caught as GridError).field).toBe('cellM');
    expect((caught as GridError).message).toContain(String(MAX_GRID_NODES));
  });

  it('refuses a bad model with every problem listed', () => {
    const bad = { surface: [], layers: [{ velocity: 0 }] } as unknown as LayeredModel;
    expect(() => buildVelocityGrid(bad, { xMin: 0, xMax: 1, zMin: 0, zMax: 1, cellM: 0.5 })).toThrow(ModelError);
    expect(checkModel(bad).map((p) => p.path)).toEqual(['/surface', '/layers/0/velocity']);
  });

  it('checks vertex order and the first layer', () => {
    const problems = checkModel({
      surface: [{ x: 5, elevation: 0 }, { x: 1, elevation: 0 }],
      layers: [{ velocity: 500, top: [] }],
    });
    expect(problems.map((p) => p.code)).toEqual(['vertices-not-in-order', 'top-on-first-layer']);
  });
});
