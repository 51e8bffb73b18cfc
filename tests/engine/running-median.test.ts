/** RunningMedian (engine/velocities/running-median.ts) against simple-statistics' median after every insert. */
import { median } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { RunningMedian } from '../../engine/velocities/running-median.js';
import { mulberry32 } from '../helpers/random.js';

describe('RunningMedian: the same median as simple-statistics after every value added', () => {
  it('is null when empty', () => {
    expect(new RunningMedian().median()).toBeNull();
  });
  it('on seeded random sequences with repeated values, exactly', () => {
    for (let seed = 1; seed <= 20; seed++) {
      const rng = mulberry32(seed);
      const m = new RunningMedian();
      const values: number[] = [];
      for (let n = 0; n < 300; n++) {
        const v = rng() < 0.2 ? Math.floor(rng() * 5) : (rng() - 0.5) * 1e3;
        values.push(v);
        m.add(v);
        expect(m.median()).toBe(median(values));
      }
    }
  });
  it('matches the worked example', () => {
    const m = new RunningMedian();
    [3, 1, 4, 1].forEach((v) => m.add(v));
    expect(m.median()).toBe(2);
  });
});
