import { describe, expect, it } from 'vitest';
import { phantomArrivals } from '../../engine/plus-minus/phantom.js';

describe('phantomArrivals', () => {
  it('shifts the off-end arrivals by the mean difference where both shots are refracted', () => {
    // Two parallel refracted branches 9 ms apart (constant difference: Hagedoorn 1959 delay-time form).
    const source = [20, 22, 24, 26, 28, 30];
    const target = [null, null, 15, 17, 19, 21];
    const result = phantomArrivals({ targetRefractedMs: target, sourceRefractedMs: source });
    expect(result).not.toBeNull();
    expect(result!.shiftMs).toBeCloseTo(9, 12);
    expect(result!.parallelRmsMs).toBeCloseTo(0, 12);
    expect(result!.timesMs).toEqual([11, 13, null, null, null, null]);
    expect(result!.overlapCount).toBe(4);
    expect(result!.phantomCount).toBe(2);
  });

  it('reports the RMS of the difference about its mean as the parallelism check', () => {
    const source = [20, 22, 24, 26];
    const target = [null, 12, 15, 16]; // differences 10, 9, 10: mean 29/3
    const result = phantomArrivals({ targetRefractedMs: target, sourceRefractedMs: source })!;
    const mean = 29 / 3;
    const rms = Math.sqrt(((10 - mean) ** 2 + (9 - mean) ** 2 + (10 - mean) ** 2) / 3);
    expect(result.shiftMs).toBeCloseTo(mean, 12);
    expect(result.parallelRmsMs).toBeCloseTo(rms, 12);
    expect(result.timesMs[0]).toBeCloseTo(20 - mean, 12);
  });

  it('phantoms only eligible geophones', () => {
    const result = phantomArrivals({
      targetRefractedMs: [null, null, 15, 17],
      sourceRefractedMs: [20, 22, 24, 26],
      eligible: [false, true, true, true],
    })!;
    expect(result.timesMs).toEqual([null, 13, null, null]);
  });

  it('returns null when the shots share too few refracted arrivals for a shift', () => {
    expect(phantomArrivals({ targetRefractedMs: [null, null, 15], sourceRefractedMs: [20, 22, 24] })).toBeNull();
    expect(
      phantomArrivals({ targetRefractedMs: [null, 1, 2], sourceRefractedMs: [3, 4, 5], minimumOverlap: 3 }),
    ).toBeNull();
  });

  it('returns null for arrays of different length instead of misaligning geophones', () => {
    expect(phantomArrivals({ targetRefractedMs: [1, 2, 3], sourceRefractedMs: [1, 2] })).toBeNull();
  });

  it('does not invent a phantom where the source shot has no refracted arrival', () => {
    const result = phantomArrivals({ targetRefractedMs: [null, null, 15, 17], sourceRefractedMs: [null, 22, 24, 26] })!;
    expect(result.timesMs).toEqual([null, 13, null, null]);
  });
});
