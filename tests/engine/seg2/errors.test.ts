/**
 * Broken SEG-2 files give a Seg2Error naming the byte offset and the problem; odd but
 * readable ones give warnings. Each fixture is a valid file (the writer's, little- or
 * big-endian) with the bytes the standard fixes (Pullan, Geophysics 55, 1990; offsets in
 * engine/seg2/layout.ts) overwritten by hand. Then a fuzz test: random corruption of a valid
 * file only ever gives a result or a Seg2Error, never another exception or a hang.
 */
import { describe, expect, it } from 'vitest';
import { readSeg2 } from '../../../engine/seg2/read.js';
import { writeSeg2 } from '../../../engine/seg2/write.js';
import { gatherFromSeg2 } from '../../../engine/seg2/gather.js';
import { Seg2Error, type Seg2String } from '../../../engine/seg2/types.js';
import { mulberry32 } from '../../helpers/random.js';

function traceStrings(i: number, extra: Seg2String[] = []): Seg2String[] {
  return [
    { keyword: 'SAMPLE_INTERVAL', value: '0.00025' },
    { keyword: 'RECEIVER_LOCATION', value: String(2 * i) },
    { keyword: 'SOURCE_LOCATION', value: '-3' },
    ...extra,
  ];
}

function valid(littleEndian = true, traceExtra: Seg2String[] = [], fileStrings: Seg2String[] = [{ keyword: 'UNITS', value: 'METERS' }]): Uint8Array {
  return writeSeg2({
    littleEndian,
    revision: 1,
    strings: fileStrings,
    traces: [0, 1, 2].map((i) => ({ format: 2, samples: Float64Array.from({ length: 16 }, (_, k) => k * (i + 1)), strings: traceStrings(i, traceExtra) })),
  });
}

function errorOf(bytes: Uint8Array): Seg2Error {
  try {
    readSeg2(bytes);
  } catch (error) {
    if (error instanceof Seg2Error) return error;
    throw error;
  }
  throw new Error('expected a Seg2Error');
}

const pointer = (bytes: Uint8Array, i: number) => new DataView(bytes.buffer).getUint32(32 + 4 * i, true);

describe('broken SEG-2 files: a clear error at a byte offset', () => {
  it('too short for the file descriptor block', () => {
    const e = errorOf(valid().subarray(0, 20));
    expect(e.code).toBe('truncated');
    expect(e.byteOffset).toBe(20);
    expect(e.message).toMatch(/byte 20: .*32-byte file descriptor block/);
  });
  it('not a SEG-2 id', () => {
    const bytes = valid();
    bytes[0] = 0x50;
    expect(errorOf(bytes)).toMatchObject({ code: 'not-seg2', byteOffset: 0 });
  });
  it('no traces counted', () => {
    const bytes = valid();
    new DataView(bytes.buffer).setUint16(6, 0, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'no-traces', byteOffset: 6 });
  });
  it('more traces counted than the pointer sub-block holds', () => {
    const bytes = valid(false);
    new DataView(bytes.buffer).setUint16(6, 9, false);
    const e = errorOf(bytes);
    expect(e).toMatchObject({ code: 'pointer-block-too-small', byteOffset: 4 });
    expect(e.message).toMatch(/9 traces/);
  });
  it('a pointer sub-block larger than the file (absurd size)', () => {
    const bytes = valid().slice(0, 200);
    new DataView(bytes.buffer).setUint16(4, 65532, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'truncated', byteOffset: 200 });
  });
  it('a trace pointer past the end of the file', () => {
    const bytes = valid();
    new DataView(bytes.buffer).setUint32(32 + 4 * 2, 0xfffffff0, true);
    const e = errorOf(bytes);
    expect(e).toMatchObject({ code: 'bad-trace-pointer', byteOffset: 40 });
    expect(e.message).toMatch(/trace 3 of 3 is 4294967280, past the end/);
  });
  it('a trace pointer into the file descriptor block', () => {
    const bytes = valid();
    new DataView(bytes.buffer).setUint32(32, 8, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'bad-trace-pointer', byteOffset: 32 });
  });
  it('a pointer that does not land on a trace descriptor', () => {
    const bytes = valid();
    const p = pointer(bytes, 1) + 4;
    new DataView(bytes.buffer).setUint32(36, p, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'bad-trace-descriptor', byteOffset: p });
  });
  it('a trace descriptor size smaller than its fixed part', () => {
    const bytes = valid();
    const p = pointer(bytes, 0);
    new DataView(bytes.buffer).setUint16(p + 2, 8, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'bad-trace-descriptor-size', byteOffset: p + 2 });
  });
  it('an unknown data format code', () => {
    const bytes = valid();
    const p = pointer(bytes, 1);
    bytes[p + 12] = 9;
    expect(errorOf(bytes)).toMatchObject({ code: 'bad-format', byteOffset: p + 12 });
  });
  it('format 3 (20-bit packed) is named and refused', () => {
    const bytes = valid();
    const p = pointer(bytes, 0);
    bytes[p + 12] = 3;
    const e = errorOf(bytes);
    expect(e).toMatchObject({ code: 'format-not-read', byteOffset: p + 12 });
    expect(e.message).toMatch(/20-bit packed/);
  });
  it('more samples counted than the data block holds (absurd count, nothing allocated)', () => {
    const bytes = valid();
    const p = pointer(bytes, 2);
    new DataView(bytes.buffer).setUint32(p + 8, 0xffffffff, true);
    expect(errorOf(bytes)).toMatchObject({ code: 'bad-sample-count', byteOffset: p + 8 });
  });
  it('a file cut short inside the last trace', () => {
    const bytes = valid().slice(0, -10);
    const e = errorOf(bytes);
    expect(e).toMatchObject({ code: 'truncated', byteOffset: bytes.length });
    expect(e.message).toMatch(/inside the samples of trace 3 of 3/);
  });
  it('a sample interval that is not a number names the trace and its descriptor', () => {
    const bytes = writeSeg2({
      littleEndian: true, revision: 1, strings: [],
      traces: [{ format: 1, samples: Float64Array.of(1, 2), strings: [{ keyword: 'SAMPLE_INTERVAL', value: 'fast' }, { keyword: 'RECEIVER_LOCATION', value: '0' }, { keyword: 'SOURCE_LOCATION', value: '0' }] }],
    });
    expect(() => gatherFromSeg2(bytes)).toThrow(/byte \d+: trace 1's SAMPLE_INTERVAL is "fast", not a number/);
  });
});

describe('odd but readable SEG-2 files: warnings', () => {
  it('a broken string chain ends the strings with a warning; the traces still read', () => {
    const bytes = valid();
    const stringsAt = 32 + 12; // after three 4-byte pointers
    new DataView(bytes.buffer).setUint16(stringsAt, 60000, true);
    const { warnings, file } = readSeg2(bytes);
    expect(warnings.map((w) => w.code)).toEqual(['seg2-string-chain']);
    expect(warnings[0].byteOffset).toBe(stringsAt);
    expect(file.traces.length).toBe(3);
  });
  it('revision other than 1 warns', () => {
    const bytes = valid();
    bytes[2] = 2;
    expect(readSeg2(bytes).warnings.map((w) => w.code)).toContain('seg2-revision');
  });
  it('no UNITS, no ACQUISITION_DATE or _TIME: metres assumed with a warning; date and time null', () => {
    const g = gatherFromSeg2(valid(true, [], []));
    expect(g.warnings.map((w) => w.code)).toContain('seg2-no-units');
    expect(g.acquisition).toEqual({ date: null, time: null });
  });
  it('FEET converts to metres (1 ft = 0.3048 m, the international foot)', () => {
    const g = gatherFromSeg2(valid(true, [], [{ keyword: 'UNITS', value: 'FEET' }]));
    expect(g.traces.map((t) => t.x)).toEqual([0, 2 * 0.3048, 4 * 0.3048]);
    expect(g.shot.x).toBeCloseTo(-3 * 0.3048, 12);
  });
  it('a rounded sample interval (0.0000313 s for 31.25 µs) is taken as the nominal one, with a warning', () => {
    const bytes = writeSeg2({
      littleEndian: true, revision: 1, strings: [{ keyword: 'UNITS', value: 'METERS' }],
      traces: [{ format: 1, samples: Float64Array.of(0, 1), strings: [{ keyword: 'SAMPLE_INTERVAL', value: '0.0000313' }, { keyword: 'RECEIVER_LOCATION', value: '0' }, { keyword: 'SOURCE_LOCATION', value: '0' }] }],
    });
    const g = gatherFromSeg2(bytes);
    expect(g.traces[0].sampleIntervalMs).toBe(0.03125);
    expect(g.warnings.map((w) => w.code)).toContain('seg2-interval-rounded');
  });
  it('DELAY (s, negative for pre-trigger samples) becomes delayMs; a missing DELAY is 0', () => {
    expect(gatherFromSeg2(valid(true, [{ keyword: 'DELAY', value: '-0.02' }])).traces[0].delayMs).toBeCloseTo(-20, 12);
    expect(gatherFromSeg2(valid()).traces[0].delayMs).toBe(0);
  });
  it('missing geometry is an error that names the query parameter, which then supplies it', () => {
    const bare = writeSeg2({ littleEndian: true, revision: 1, strings: [], traces: [{ format: 1, samples: Float64Array.of(0, 1), strings: [{ keyword: 'SAMPLE_INTERVAL', value: '0.001' }] }] });
    expect(() => gatherFromSeg2(bare)).toThrow(/geophoneX0 and geophoneSpacing/);
    expect(() => gatherFromSeg2(bare, { geophoneX0: 0, geophoneSpacing: 2 })).toThrow(/shotX/);
    const g = gatherFromSeg2(bare, { geophoneX0: 10, geophoneSpacing: 2, shotX: 4 });
    expect(g.traces[0].x).toBe(10);
    expect(g.shot).toEqual({ x: 4, elevation: 0 });
  });
});

describe('fuzz: random corruption of a valid file', () => {
  it('gives a result or a Seg2Error for every one of 3,000 corrupted files', () => {
    const rng = mulberry32(20240307);
    const originals = [valid(true), valid(false)];
    let errors = 0;
    for (let n = 0; n < 3000; n++) {
      const bytes = originals[n % 2].slice();
      const kind = Math.floor(rng() * 3);
      if (kind === 0) {
        const flips = 1 + Math.floor(rng() * 8);
        for (let f = 0; f < flips; f++) bytes[Math.floor(rng() * bytes.length)] = Math.floor(rng() * 256);
      } else if (kind === 1) {
        // Overwrite one 16- or 32-bit field at a random even offset with an extreme value.
        const at = 2 * Math.floor(rng() * (bytes.length / 2 - 2));
        new DataView(bytes.buffer).setUint32(at, [0, 0xffffffff, 0x7fffffff, 0x10000, 3][Math.floor(rng() * 5)]);
      }
      const input = kind === 2 ? bytes.subarray(0, Math.floor(rng() * bytes.length)) : bytes;
      try {
        gatherFromSeg2(input);
      } catch (error) {
        expect(error).toBeInstanceOf(Seg2Error);
        expect((error as Seg2Error).message).toMatch(/^SEG-2 file, byte \d+: /);
        errors++;
      }
    }
    // Sanity that the corruption bites (it is not a test of a count).
    expect(errors).toBeGreaterThan(100);
  });
});
