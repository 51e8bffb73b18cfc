/**
 * Property: the SEG-2 reader (Pullan, Geophysics 55, 1990) reads back exactly what the
 * writer wrote, for any trace count, sample count, data format, byte order and strings;
 * and any damage to a valid file (bytes flipped, cut short, junk inserted, or random bytes
 * altogether) yields either a file or a Seg2Error naming a byte offset inside the file,
 * never another exception.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readSeg2 } from '../../engine/seg2/read.js';
import { writeSeg2 } from '../../engine/seg2/write.js';
import { tryGatherFromSeg2 } from '../../engine/seg2/gather.js';
import { Seg2Error, type Seg2File } from '../../engine/seg2/types.js';
import type { Seg2Format } from '../../engine/seg2/layout.js';
import { runs } from './line-arbitraries.js';

/** Samples a format holds exactly: 16- and 32-bit integers, 32-bit floats (fround), 64-bit floats. */
function samplesFor(format: Seg2Format): fc.Arbitrary<number[]> {
  const n = { maxLength: 300 };
  if (format === 1) return fc.array(fc.integer({ min: -32768, max: 32767 }), n);
  if (format === 2) return fc.array(fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }), n);
  if (format === 4) return fc.array(fc.float({ noNaN: true, noDefaultInfinity: true }).map(Math.fround), n);
  return fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), n);
}

const keyword = fc.stringMatching(/^[A-Z][A-Z_]{0,15}$/);
const value = fc.stringMatching(/^[ -~]{0,40}$/).map((s) => s.trim());
const strings = fc.array(fc.record({ keyword, value }), { maxLength: 6 });

const trace = fc.constantFrom<Seg2Format>(1, 2, 4, 5).chain((format) =>
  fc.record({ format: fc.constant(format), samples: samplesFor(format).map((s) => Float64Array.from(s)), strings }),
);

const seg2File: fc.Arbitrary<Seg2File> = fc.record({
  littleEndian: fc.boolean(),
  revision: fc.constant(1),
  strings,
  traces: fc.array(trace, { minLength: 1, maxLength: 8 }),
});

function readsOrRefuses(bytes: Uint8Array): void {
  try {
    readSeg2(bytes);
  } catch (error) {
    expect(error).toBeInstanceOf(Seg2Error);
    const e = error as Seg2Error;
    expect(e.byteOffset).toBeGreaterThanOrEqual(0);
    expect(e.byteOffset).toBeLessThanOrEqual(bytes.length);
    expect(e.message).toMatch(/^SEG-2 file, byte \d+: /);
  }
  // The gather path (geometry from the strings) must refuse as cleanly.
  const gathered = tryGatherFromSeg2(bytes);
  if (!gathered.ok) expect(typeof gathered.error.message).toBe('string');
}

/** One kind of damage to a valid file. */
const damage = fc.oneof(
  fc.record({ kind: fc.constant('flip' as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }), count: fc.integer({ min: 1, max: 12 }) }),
  fc.record({ kind: fc.constant('cut' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), junk: fc.uint8Array({ minLength: 1, maxLength: 64 }) }),
);

type Damage = typeof damage extends fc.Arbitrary<infer D> ? D : never;

function damaged(bytes: Uint8Array, d: Damage): Uint8Array {
  const at = d.at % Math.max(1, bytes.length);
  if (d.kind === 'cut') return bytes.slice(0, at);
  if (d.kind === 'insert') {
    const out = new Uint8Array(bytes.length + d.junk.length);
    out.set(bytes.subarray(0, at));
    out.set(d.junk, at);
    out.set(bytes.subarray(at), at + d.junk.length);
    return out;
  }
  const out = bytes.slice();
  for (let k = 0; k < d.count; k++) out[(at + k * 7) % out.length] ^= d.byte || 0xff;
  return out;
}

describe('SEG-2 reader (property)', () => {
  it('reads back exactly what the writer wrote, in every format and byte order', () => {
    fc.assert(
      fc.property(seg2File, (file) => {
        const read = readSeg2(writeSeg2(file));
        expect(read.file.littleEndian).toBe(file.littleEndian);
        expect(read.file.traces).toHaveLength(file.traces.length);
        read.file.traces.forEach((t, k) => {
          expect(t.format).toBe(file.traces[k].format);
          expect(Array.from(t.samples)).toEqual(Array.from(file.traces[k].samples));
          expect(t.strings).toEqual(file.traces[k].strings);
        });
        expect(read.file.strings).toEqual(file.strings);
      }),
      runs(150, 8_000),
    );
  });

  it('gives a file or a Seg2Error with a byte offset for any damage to a valid file', () => {
    fc.assert(
      fc.property(seg2File, damage, (file, d) => readsOrRefuses(damaged(writeSeg2(file), d))),
      runs(400, 8_000),
    );
  });

  it('gives a file or a Seg2Error for random bytes, with or without a SEG-2 id in front', () => {
    const withId = fc.tuple(fc.boolean(), fc.uint8Array({ maxLength: 2048 })).map(([little, rest]) => {
      const out = new Uint8Array(rest.length + 2);
      out.set(little ? [0x55, 0x3a] : [0x3a, 0x55]);
      out.set(rest, 2);
      return out;
    });
    fc.assert(fc.property(fc.oneof(fc.uint8Array({ maxLength: 512 }), withId), readsOrRefuses), runs(400, 4_000));
  });
});
