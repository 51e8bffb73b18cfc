/**
 * The running-sum forms of combineWeighted and combineMinusTimes (issue 9) against the plain
 * forms they replaced (tests/helpers/plain-minus-times.ts) on seeded random pairs: partial
 * coverage, gaps, missing and non-positive variances, disjoint groups of pairs.
 * Agreement to 1e-9 relative (they add in the same order, so they agree exactly in practice).
 */
import { describe, expect, it } from 'vitest';
import { combineMinusTimes, combineWeighted, type WeightedCombination } from '../../engine/plus-minus/plus-minus.js';
import { plainCombineMinusTimes, plainCombineWeighted } from '../helpers/plain-minus-times.js';
import { mulberry32 } from '../helpers/random.js';
import { fromNullable } from '../../engine/shared/nan-none.js';

const RELATIVE = 1e-9;

function randomPairs(seed: number, pairs: number, geophones: number): { values: (number | null)[][]; variances: (number | null)[][] } {
  const rng = mulberry32(seed);
  const values: (number | null)[][] = [];
  const variances: (number | null)[][] = [];
  for (let k = 0; k < pairs; k++) {
    // Some pairs live on a disjoint far part of the line, so that not every pair joins.
    const far = rng() < 0.1;
    const from = far ? geophones : Math.floor(rng() * geophones * 0.7);
    const to = far ? geophones + 3 : from + 1 + Math.floor(rng() * (geophones - from));
    const offset = 20 * (rng() - 0.5);
    values.push(Array.from({ length: geophones }, (_, i) => (i >= from && i <= to && rng() > 0.05 ? 0.8 * i + offset + 0.3 * (rng() - 0.5) : null)));
    variances.push(Array.from({ length: geophones }, () => {
      const u = rng();
      return u < 0.03 ? null : u < 0.05 ? 0 : 0.01 + rng() * rng();
    }));
  }
  return { values, variances };
}

function expectAgree(actual: WeightedCombination, expected: WeightedCombination): void {
  expect(actual.pairCount).toEqual(expected.pairCount);
  for (const key of ['valueMs', 'sigmaMs', 'chiSquare'] as const) {
    expect(actual[key].length).toBe(expected[key].length);
    actual[key].forEach((a, i) => {
      const e = expected[key][i];
      if (e === null || a === null) {
        expect(a).toBe(e);
        return;
      }
      expect(Math.abs(a - e)).toBeLessThanOrEqual(RELATIVE * Math.max(1, Math.abs(e)));
    });
  }
}

describe('combineWeighted: the allocation-free loop agrees with the plain form', () => {
  it('on 40 seeded random sets of pairs', () => {
    for (let seed = 1; seed <= 40; seed++) {
      const { values, variances } = randomPairs(seed, 1 + (seed % 30), 40);
      expectAgree(combineWeighted(values.map(fromNullable), variances.map(fromNullable), 40), plainCombineWeighted(values, variances, 40));
    }
  });
});

describe('combineMinusTimes: the running-sum form agrees with the plain form', () => {
  it('on 60 seeded random sets of pairs (1 to 120 pairs, 10 to 96 geophones)', () => {
    for (let seed = 1; seed <= 60; seed++) {
      const geophones = 10 + ((seed * 7) % 87);
      const { values, variances } = randomPairs(1000 + seed, 1 + ((seed * 13) % 120), geophones);
      expectAgree(combineMinusTimes(values.map(fromNullable), variances.map(fromNullable), geophones), plainCombineMinusTimes(values, variances, geophones));
    }
  });
  it('leaves out pairs that share no geophone with the rest, as the plain form does', () => {
    const values = [[1, 2, 3, null, null, null], [null, null, null, 7, 8, 9], [5, 6, null, null, null, null]];
    const variances = values.map((row) => row.map((v) => (v === null ? null : 0.1)));
    const fast = combineMinusTimes(values.map(fromNullable), variances.map(fromNullable), 6);
    expectAgree(fast, plainCombineMinusTimes(values, variances, 6));
    expect(fast.valueMs.slice(3)).toEqual([null, null, null]);
  });
});
