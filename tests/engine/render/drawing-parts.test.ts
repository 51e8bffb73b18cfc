import { describe, expect, it } from 'vitest';
import { linearScale } from '../../../engine/render/scale.js';
import { niceStep, tickValues, niceExaggerationAtMost } from '../../../engine/render/ticks.js';
import { formatVelocity, formatTick, groupThousands } from '../../../engine/render/format.js';
import { wrapText } from '../../../engine/render/text.js';
import { profileRuns, elevationOnProfile } from '../../../engine/render/refractor-path.js';
import { LabelPlacer } from '../../../engine/render/label-placer.js';

describe('linearScale', () => {
  it('maps the domain ends to the range ends and inverts exactly', () => {
    const s = linearScale([30, 40], [150, 50]);
    expect(s(30)).toBe(150);
    expect(s(40)).toBe(50);
    expect(s(35)).toBe(100);
    expect(s.invert(s(33.3))).toBeCloseTo(33.3, 12);
    expect(s.plotPerUnit).toBe(-10);
  });
  it('refuses an empty or non-finite domain, naming it', () => {
    expect(() => linearScale([1, 1], [0, 10])).toThrow(/domain/);
    expect(() => linearScale([0, Number.NaN], [0, 10])).toThrow(/domain/);
  });
});

describe('niceStep and tickValues', () => {
  it('picks 1, 2 or 5 × 10^n steps', () => {
    expect(niceStep(70, 14)).toBe(5);
    expect(niceStep(12, 9)).toBe(2);
    expect(niceStep(0.9, 9)).toBe(0.1);
    expect(niceStep(3400, 8)).toBe(500);
    expect(niceStep(0, 5)).toBe(1);
  });
  it('lists the multiples inside the range without float noise', () => {
    expect(tickValues(-12.5, 58.4, 10)).toEqual([-10, 0, 10, 20, 30, 40, 50]);
    expect(tickValues(0.05, 0.62, 0.1)).toEqual([0.1, 0.2, 0.3, 0.4, 0.5, 0.6]);
  });
  it('rounds exaggeration down to a round ratio, never below 1', () => {
    expect(niceExaggerationAtMost(3.7)).toBe(3);
    expect(niceExaggerationAtMost(2.49)).toBe(2);
    expect(niceExaggerationAtMost(17)).toBe(15);
    expect(niceExaggerationAtMost(0.4)).toBe(1);
    expect(niceExaggerationAtMost(Number.NaN)).toBe(1);
  });
});

describe('formatting', () => {
  it('groups thousands and rounds velocities to 10 m/s', () => {
    expect(groupThousands(1234567)).toBe('1,234,567');
    expect(formatVelocity(2483.2)).toBe('2,480 m/s');
    expect(formatVelocity(610)).toBe('610 m/s');
  });
  it('gives tick labels the decimals of their step', () => {
    expect(formatTick(2.5, 0.5)).toBe('2.5');
    expect(formatTick(40, 10)).toBe('40');
    expect(formatTick(-0, 1)).toBe('0');
  });
});

describe('wrapText', () => {
  it('keeps every word, in order, and breaks long text into lines', () => {
    const text = 'one two three four five six seven eight nine ten eleven twelve';
    const lines = wrapText(text, 20, 2.5);
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.join(' ')).toBe(text);
  });
});

describe('profileRuns', () => {
  it('splits at null and non-finite values', () => {
    const runs = profileRuns([1, null, 3, 4, Number.NaN, 6], (_v, ) => 0, (v) => v);
    expect(runs.map((r) => r.length)).toEqual([1, 2, 1]);
  });
  it('places markers on the drawn profile by straight lines between points, null in gaps', () => {
    const runs = [[{ x: 0, elevation: 10 }, { x: 10, elevation: 20 }], [{ x: 20, elevation: 5 }, { x: 30, elevation: 5 }]];
    expect(elevationOnProfile(runs, 2.5)).toBe(12.5);
    expect(elevationOnProfile(runs, 15)).toBeNull();
    expect(elevationOnProfile(runs, 30)).toBe(5);
  });
});

describe('LabelPlacer', () => {
  it('takes the first candidate that overlaps nothing already placed', () => {
    const placer = new LabelPlacer();
    placer.reserve({ x0: 0, y0: 0, x1: 10, y1: 10 });
    const chosen = placer.choose([
      { x0: 5, y0: 5, x1: 15, y1: 15 },
      { x0: 20, y0: 0, x1: 30, y1: 10 },
    ]);
    expect(chosen).toBe(1);
    // The chosen box is now taken too.
    expect(placer.choose([{ x0: 25, y0: 5, x1: 35, y1: 8 }, { x0: 40, y0: 0, x1: 41, y1: 1 }])).toBe(1);
  });
});
