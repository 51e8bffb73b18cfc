/**
 * The SEG-2 writer, for tests and the demo gathers: a Seg2File in, the bytes out, laid out
 * as layout.ts describes (Pullan, Geophysics 55, 1990), so readSeg2 reads it back exactly.
 * Strings end with one NUL (string terminator size 1); a "\n" in a value is written as the
 * line terminator LF (size 1). Blocks are padded to multiples of 4 bytes, as the standard
 * asks of descriptor sizes. Samples must fit their format (integers in range for formats
 * 1 and 2, numbers a 32-bit float holds exactly for format 4, finite numbers); anything else throws a RangeError, since a test or sample that
 * writes a value the format cannot hold has a bug.
 */
import { BYTES_PER_SAMPLE, FDB, FILE_DESCRIPTOR_ID, MAX_BLOCK_SIZE, STRING_OFFSET_BYTES, TDB, TRACE_DESCRIPTOR_ID, type Seg2Format } from './layout.js';
import type { Seg2File, Seg2String } from './types.js';

const NUL = 0;
const LF = 0x0a;

function pad4(n: number): number {
  return Math.ceil(n / 4) * 4;
}

/** The bytes of the string list: each entry offset + text + NUL, then a 0 offset. */
function stringBytes(strings: readonly Seg2String[], littleEndian: boolean): Uint8Array {
  const parts: number[] = [];
  for (const { keyword, value } of strings) {
    const text = value === '' ? keyword : `${keyword} ${value}`;
    const codes: number[] = [];
    for (const ch of text) {
      const code = ch === '\n' ? LF : ch.charCodeAt(0);
      if (code > 0xff || code === NUL) throw new RangeError(`SEG-2 strings are 8-bit text without NUL; "${text}" is not.`);
      codes.push(code);
    }
    const entry = STRING_OFFSET_BYTES + codes.length + 1;
    if (entry > 0xffff) throw new RangeError(`The string "${keyword}" is too long for SEG-2 (${entry} bytes).`);
    parts.push(...(littleEndian ? [entry & 0xff, entry >> 8] : [entry >> 8, entry & 0xff]), ...codes, NUL);
  }
  parts.push(0, 0);
  return Uint8Array.from(parts);
}

function checkSample(value: number, format: Seg2Format, trace: number, k: number): void {
  const bad =
    !Number.isFinite(value) ||
    (format === 1 && (!Number.isInteger(value) || value < -32768 || value > 32767)) ||
    (format === 2 && (!Number.isInteger(value) || value < -2147483648 || value > 2147483647)) ||
    (format === 4 && Math.fround(value) !== value);
  if (bad) throw new RangeError(`Sample ${k} of trace ${trace + 1} (${value}) does not fit SEG-2 data format ${format}.`);
}

/** Writes a SEG-2 file. O(total samples + strings). */
export function writeSeg2(file: Seg2File): Uint8Array {
  const le = file.littleEndian;
  const traceCount = file.traces.length;
  if (traceCount < 1 || traceCount > 0xffff) throw new RangeError(`A SEG-2 file holds 1 to 65535 traces; got ${traceCount}.`);
  const pointerBlockSize = 4 * traceCount;
  if (pointerBlockSize > MAX_BLOCK_SIZE) throw new RangeError(`${traceCount} traces need a pointer sub-block over the standard's ${MAX_BLOCK_SIZE} bytes.`);
  const fileStrings = stringBytes(file.strings, le);
  const headerSize = pad4(FDB.fixedSize + pointerBlockSize + fileStrings.length);

  const traceParts = file.traces.map((trace, i) => {
    const strings = stringBytes(trace.strings, le);
    const blockSize = pad4(TDB.fixedSize + strings.length);
    if (blockSize > MAX_BLOCK_SIZE) throw new RangeError(`The strings of trace ${i + 1} make its descriptor over ${MAX_BLOCK_SIZE} bytes.`);
    const dataSize = trace.samples.length * BYTES_PER_SAMPLE[trace.format];
    return { trace, strings, blockSize, dataSize };
  });
  const total = headerSize + traceParts.reduce((sum, p) => sum + p.blockSize + p.dataSize, 0);
  const bytes = new Uint8Array(total);
  const view = new DataView(bytes.buffer);

  view.setUint16(FDB.id, FILE_DESCRIPTOR_ID, le);
  view.setUint16(FDB.revision, file.revision, le);
  view.setUint16(FDB.pointerBlockSize, pointerBlockSize, le);
  view.setUint16(FDB.traceCount, traceCount, le);
  bytes[FDB.stringTerminatorSize] = 1;
  bytes[FDB.stringTerminator] = NUL;
  bytes[FDB.lineTerminatorSize] = 1;
  bytes[FDB.lineTerminator] = LF;
  bytes.set(fileStrings, FDB.fixedSize + pointerBlockSize);

  let at = headerSize;
  traceParts.forEach(({ trace, strings, blockSize, dataSize }, i) => {
    view.setUint32(FDB.fixedSize + 4 * i, at, le);
    view.setUint16(at + TDB.id, TRACE_DESCRIPTOR_ID, le);
    view.setUint16(at + TDB.blockSize, blockSize, le);
    view.setUint32(at + TDB.dataSize, dataSize, le);
    view.setUint32(at + TDB.sampleCount, trace.samples.length, le);
    bytes[at + TDB.format] = trace.format;
    bytes.set(strings, at + TDB.fixedSize);
    const data = at + blockSize;
    trace.samples.forEach((value, k) => {
      checkSample(value, trace.format, i, k);
      if (trace.format === 1) view.setInt16(data + 2 * k, value, le);
      else if (trace.format === 2) view.setInt32(data + 4 * k, value, le);
      else if (trace.format === 4) view.setFloat32(data + 4 * k, value, le);
      else view.setFloat64(data + 8 * k, value, le);
    });
    at = data + dataSize;
  });
  return bytes;
}
