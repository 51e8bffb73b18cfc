/**
 * Writer → reader round trip for every data format Arcline writes and both byte orders
 * (Pullan, Geophysics 55, 1990: formats 1, 2, 4, 5; block ids 3A55 / 4422 in the file's
 * byte order). The values include each format's extremes, so a wrong width or sign fails.
 */
import { describe, expect, it } from 'vitest';
import { readSeg2 } from '../../../engine/seg2/read.js';
import { writeSeg2 } from '../../../engine/seg2/write.js';
import type { Seg2File } from '../../../engine/seg2/types.js';
import type { Seg2Format } from '../../../engine/seg2/layout.js';

const VALUES: Record<Seg2Format, number[]> = {
  1: [0, 1, -1, 32767, -32768, 1234, -4321],
  2: [0, 1, -1, 2147483647, -2147483648, 70000, -123456],
  4: [0, 1.5, -2.25, Math.fround(3.4e38), Math.fround(-1e-30), Math.fround(0.1), -0],
  5: [0, 0.1, -1e300, 5e-324, Math.PI, -Math.E, 1e-10],
};

function sample(format: Seg2Format, littleEndian: boolean): Seg2File {
  return {
    littleEndian,
    revision: 1,
    strings: [
      { keyword: 'ACQUISITION_DATE', value: '07/MAR/2024' },
      { keyword: 'UNITS', value: 'METERS' },
      { keyword: 'NOTE', value: 'first line\nsecond line' },
      { keyword: 'VENDOR_THING', value: 'kept as metadata' },
    ],
    traces: [0, 1, 2].map((t) => ({
      format,
      samples: Float64Array.from(VALUES[format].map((v) => (t === 1 ? v : v))),
      strings: [
        { keyword: 'SAMPLE_INTERVAL', value: '0.00025' },
        { keyword: 'DELAY', value: '-0.01' },
        { keyword: 'RECEIVER_LOCATION', value: String(2 * t) },
        { keyword: 'SOURCE_LOCATION', value: '-5' },
      ],
    })),
  };
}

describe('SEG-2 round trip (writer then reader)', () => {
  for (const format of [1, 2, 4, 5] as const) {
    for (const littleEndian of [true, false]) {
      it(`format ${format}, ${littleEndian ? 'little' : 'big'}-endian: headers, strings and samples come back exactly`, () => {
        const file = sample(format, littleEndian);
        const bytes = writeSeg2(file);
        // The id as bytes says the byte order (Pullan 1990): 55 3A little-endian, 3A 55 big-endian.
        expect([bytes[0], bytes[1]]).toEqual(littleEndian ? [0x55, 0x3a] : [0x3a, 0x55]);
        const { file: back, warnings } = readSeg2(bytes);
        expect(warnings).toEqual([]);
        expect(back.littleEndian).toBe(littleEndian);
        expect(back.revision).toBe(1);
        expect(back.strings).toEqual(file.strings);
        expect(back.traces.length).toBe(3);
        back.traces.forEach((trace, i) => {
          expect(trace.format).toBe(format);
          expect(trace.strings).toEqual(file.traces[i].strings);
          // Object.is tells -0 from 0 and compares every bit that matters.
          expect(Array.from(trace.samples).every((v, k) => Object.is(v, file.traces[i].samples[k]))).toBe(true);
        });
      });
    }
  }

  it('refuses to write a value its format cannot hold (a bug in the caller)', () => {
    const file = sample(1, true);
    file.traces[0].samples[0] = 40000;
    expect(() => writeSeg2(file)).toThrow(RangeError);
    const f4 = sample(4, true);
    f4.traces[0].samples[0] = 0.1; // not exactly a 32-bit float
    expect(() => writeSeg2(f4)).toThrow(RangeError);
  });
});
