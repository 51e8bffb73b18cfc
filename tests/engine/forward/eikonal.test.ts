import { describe, expect, it } from 'vitest';
import { solveFirstArrivals, sampleTime } from '../../../engine/forward/eikonal.js';
import { NodeHeap } from '../../../engine/forward/node-heap.js';
import { buildVelocityGrid } from '../../../engine/forward/model.js';
import { GridError, gridFromVelocityFunction } from '../../../engine/forward/velocity-grid.js';

describe('NodeHeap', () => {
  it('pops nodes in order of their keys, also after a key drops', () => {
    const keys = new Float64Array([5, 3, 8, 1, 9, 4]);
    const heap = new NodeHeap(keys);
    for (let k = 0; k < keys.length; k++) heap.pushOrDecrease(k);
    keys[4] = 0.5;
    heap.pushOrDecrease(4);
    const order: number[] = [];
    while (heap.size > 0) order.push(heap.pop());
    expect(order).toEqual([4, 3, 1, 5, 0, 2]);
    expect(heap.pop()).toBe(-1);
  });
});

describe('solveFirstArrivals', () => {
  const grid = gridFromVelocityFunction({ xMin: 0, zMin: 0, nx: 41, nz: 21, cellM: 0.5 }, () => 1000);

  it('is zero at a source on a node and t = r/V (ms) on its start disc', () => {
    const t = solveFirstArrivals(grid, { x: 10, z: 5 });
    expect(t[10 * 41 + 20]).toBe(0);
    expect(t[10 * 41 + 22]).toBeCloseTo(1, 12);
  });

  it('never enters the air: nodes above the ground skin stay unreached', () => {
    const model = { surface: [{ x: 0, elevation: 0 }], layers: [{ velocity: 800 }] };
    const g = buildVelocityGrid(model, { xMin: 0, xMax: 10, zMin: -5, zMax: 5, cellM: 0.5 });
    const t = solveFirstArrivals(g, { x: 5, z: 0 });
    const topRow = (g.nz - 1) * g.nx;
    expect(t[topRow + 3]).toBe(Infinity);
    expect(sampleTime(g, t, 9, 0)).toBeGreaterThan(0);
  });

  it('refuses a source outside the grid or in the air, naming the source', () => {
    expect(() => solveFirstArrivals(grid, { x: 50, z: 5 })).toThrow(GridError);
    const model = { surface: [{ x: 0, elevation: 0 }], layers: [{ velocity: 800 }] };
    const g = buildVelocityGrid(model, { xMin: 0, xMax: 10, zMin: -5, zMax: 5, cellM: 0.5 });
    expect(() => solveFirstArrivals(g, { x: 5, z: 4 })).toThrow(/in the air/);
    expect(() => solveFirstArrivals(g, { x: Number.NaN, z: 0 })).toThrow(/finite/);
  });

  it('runs first- and second-order stencils, the second closer to r/V', () => {
    const first = solveFirstArrivals(grid, { x: 1.3, z: 1.1 }, { order: 1 });
    const second = solveFirstArrivals(grid, { x: 1.3, z: 1.1 }, { order: 2 });
    const k = 20 * 41 + 40;
    const exact = Math.hypot(20 - 1.3, 10 - 1.1);
    expect(first[k]).not.toBe(second[k]);
    expect(Math.abs(second[k] - exact)).toBeLessThan(Math.abs(first[k] - exact));
  });
});

describe('sampleTime', () => {
  const grid = gridFromVelocityFunction({ xMin: 0, zMin: 0, nx: 21, nz: 21, cellM: 1 }, () => 2000);
  const source = { x: 10.5, z: 10.5 };
  const times = solveFirstArrivals(grid, source);

  it('interpolates between nodes, and is exact near the source when told where it is', () => {
    expect(sampleTime(grid, times, 11, 10.5, source)).toBeCloseTo(0.25, 9);
    // Without the source, the bilinear chord of the cone overestimates near its tip.
    expect(sampleTime(grid, times, 10.5, 10.5)).toBeGreaterThan(0.3);
    expect(sampleTime(grid, times, 10.5, 10.5, source)).toBeCloseTo(0, 9);
  });

  it('refuses a point outside the grid', () => {
    expect(() => sampleTime(grid, times, -1, 5)).toThrow(GridError);
  });
});
