/**
 * The SEG-2 reader: bytes in, the file's blocks, strings and samples out, or a Seg2Error
 * naming the byte offset and the problem. Pure; never allocates more than the file's own
 * length justifies (every size is checked against the bytes present before it is used),
 * and every loop advances by at least one byte or one trace, so corrupt input cannot hang
 * it. Layout facts and their source (Pullan, Geophysics 55, 1990) are in layout.ts.
 */
import { BYTES_PER_SAMPLE, FDB, FILE_DESCRIPTOR_ID, MAX_BLOCK_SIZE, PACKED_20_BIT_FORMAT, TDB, TRACE_DESCRIPTOR_ID, type Seg2Format } from './layout.js';
import { readStrings } from './strings.js';
import { Seg2Error, type Seg2File, type Seg2Trace, type Seg2Warning } from './types.js';

export interface Seg2ReadResult {
  file: Seg2File;
  /** Byte offset of each trace's descriptor block (for messages that name where a trace is). */
  traceOffsets: number[];
  warnings: Seg2Warning[];
}

function hex(value: number, digits = 4): string {
  return value.toString(16).toUpperCase().padStart(digits, '0');
}

/** Reads a SEG-2 file. Throws Seg2Error for a file that cannot be read. O(file length). */
export function readSeg2(bytes: Uint8Array): Seg2ReadResult {
  const warnings: Seg2Warning[] = [];
  const length = bytes.length;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (length < FDB.fixedSize) {
    throw new Seg2Error('truncated', length, `the file is only ${length} bytes long; a SEG-2 file starts with a 32-byte file descriptor block.`);
  }
  // The id decides the byte order (Pullan 1990: integers in the writing machine's order).
  let littleEndian: boolean;
  if (view.getUint16(FDB.id, true) === FILE_DESCRIPTOR_ID) littleEndian = true;
  else if (view.getUint16(FDB.id, false) === FILE_DESCRIPTOR_ID) littleEndian = false;
  else {
    throw new Seg2Error('not-seg2', 0, `the first two bytes are ${hex(bytes[0], 2)} ${hex(bytes[1], 2)}, not the SEG-2 file descriptor id 3A55 (55 3A little-endian or 3A 55 big-endian); this is not a SEG-2 file.`);
  }
  const u16 = (at: number): number => view.getUint16(at, littleEndian);
  const u32 = (at: number): number => view.getUint32(at, littleEndian);

  const revision = u16(FDB.revision);
  if (revision !== 1) warnings.push({ code: 'seg2-revision', message: `The file says SEG-2 revision ${revision}; Arcline reads revision 1 and reads this file as such.`, byteOffset: FDB.revision });

  const pointerBlockSize = u16(FDB.pointerBlockSize);
  const traceCount = u16(FDB.traceCount);
  if (traceCount === 0) throw new Seg2Error('no-traces', FDB.traceCount, 'the file descriptor says the file holds 0 traces.');
  if (pointerBlockSize < 4 * traceCount) {
    throw new Seg2Error('pointer-block-too-small', FDB.pointerBlockSize, `the trace pointer sub-block is ${pointerBlockSize} bytes, too small for the ${traceCount} traces the file descriptor counts (4 bytes each, ${4 * traceCount} bytes).`);
  }
  if (pointerBlockSize % 4 !== 0) warnings.push({ code: 'seg2-pointer-block-size', message: `The trace pointer sub-block is ${pointerBlockSize} bytes, not a multiple of 4 as the standard asks.`, byteOffset: FDB.pointerBlockSize });
  const stringsStart = FDB.fixedSize + pointerBlockSize;
  if (stringsStart > length) {
    throw new Seg2Error('truncated', length, `the file ends at byte ${length}, inside the trace pointer sub-block (bytes 32 to ${stringsStart - 1}) of ${traceCount} traces.`);
  }

  const terminators = readTerminators(bytes, warnings);

  const pointers: number[] = [];
  for (let i = 0; i < traceCount; i++) {
    const at = FDB.fixedSize + 4 * i;
    const pointer = u32(at);
    if (pointer < stringsStart || pointer + TDB.fixedSize > length) {
      const where = pointer < stringsStart ? `inside the file descriptor block (which ends at byte ${stringsStart - 1} or later)` : `past the end of the ${length}-byte file`;
      throw new Seg2Error('bad-trace-pointer', at, `the pointer to trace ${i + 1} of ${traceCount} is ${pointer}, ${where}.`);
    }
    pointers.push(pointer);
  }
  // The file's strings run from the end of the pointers up to the first trace descriptor.
  const firstTrace = Math.min(...pointers);
  const fileStrings = readStrings(bytes, view, littleEndian, stringsStart, firstTrace, terminators, warnings);

  const traces: Seg2Trace[] = [];
  for (let i = 0; i < traceCount; i++) traces.push(readTrace(bytes, view, littleEndian, pointers[i], i, traceCount, terminators, warnings));
  return { file: { littleEndian, revision, strings: fileStrings, traces }, traceOffsets: pointers, warnings };
}

export interface Terminators {
  /** The string terminator's bytes (Pullan 1990: 1 or 2 bytes; NUL usually). */
  string: number[];
  /** The line terminator's bytes (0 to 2 bytes), for multi-line values. */
  line: number[];
}

function readTerminators(bytes: Uint8Array, warnings: Seg2Warning[]): Terminators {
  let stringSize = bytes[FDB.stringTerminatorSize];
  if (stringSize !== 1 && stringSize !== 2) {
    warnings.push({ code: 'seg2-string-terminator', message: `The string terminator size is ${stringSize}; the standard allows 1 or 2. Strings are read as ending at their NUL byte.`, byteOffset: FDB.stringTerminatorSize });
    stringSize = 0;
  }
  let lineSize = bytes[FDB.lineTerminatorSize];
  if (lineSize > 2) {
    warnings.push({ code: 'seg2-line-terminator', message: `The line terminator size is ${lineSize}; the standard allows 0 to 2. Ignored.`, byteOffset: FDB.lineTerminatorSize });
    lineSize = 0;
  }
  return {
    string: Array.from(bytes.subarray(FDB.stringTerminator, FDB.stringTerminator + stringSize)),
    line: Array.from(bytes.subarray(FDB.lineTerminator, FDB.lineTerminator + lineSize)),
  };
}

function readTrace(
  bytes: Uint8Array,
  view: DataView,
  littleEndian: boolean,
  start: number,
  index: number,
  count: number,
  terminators: Terminators,
  warnings: Seg2Warning[],
): Seg2Trace {
  const which = `trace ${index + 1} of ${count}`;
  const length = bytes.length;
  const id = view.getUint16(start + TDB.id, littleEndian);
  if (id !== TRACE_DESCRIPTOR_ID) {
    throw new Seg2Error('bad-trace-descriptor', start, `the descriptor of ${which} should start with the id 4422 but reads ${hex(id)}; the trace pointer or the file is wrong.`);
  }
  const blockSize = view.getUint16(start + TDB.blockSize, littleEndian);
  if (blockSize < TDB.fixedSize || start + blockSize > length) {
    const why = blockSize < TDB.fixedSize ? 'less than the 32 bytes of its fixed part' : `past the end of the ${length}-byte file`;
    throw new Seg2Error('bad-trace-descriptor-size', start + TDB.blockSize, `the descriptor of ${which} says it is ${blockSize} bytes long, ${why}.`);
  }
  if (blockSize % 4 !== 0 || blockSize > MAX_BLOCK_SIZE) {
    warnings.push({ code: 'seg2-descriptor-size', message: `The descriptor of ${which} is ${blockSize} bytes, not a multiple of 4 as the standard asks.`, byteOffset: start + TDB.blockSize });
  }
  const dataSize = view.getUint32(start + TDB.dataSize, littleEndian);
  const sampleCount = view.getUint32(start + TDB.sampleCount, littleEndian);
  const code = bytes[start + TDB.format];
  if (code === PACKED_20_BIT_FORMAT) {
    throw new Seg2Error('format-not-read', start + TDB.format, `${which} is in data format 3 (20-bit packed floating point); Arcline does not read that format yet. Export the file from the seismograph software as 16- or 32-bit integers or 32-bit floats.`);
  }
  const sampleBytes = BYTES_PER_SAMPLE[code];
  if (sampleBytes === undefined) {
    throw new Seg2Error('bad-format', start + TDB.format, `${which} has data format code ${code}; the standard's codes are 1, 2, 3, 4 and 5.`);
  }
  const dataStart = start + blockSize;
  // Every size is checked against the bytes present before anything is allocated.
  const needed = sampleCount * sampleBytes;
  if (needed > dataSize) {
    throw new Seg2Error('bad-sample-count', start + TDB.sampleCount, `${which} counts ${sampleCount} samples of ${sampleBytes} bytes (${needed} bytes) but its data block is ${dataSize} bytes.`);
  }
  if (dataStart + needed > length) {
    throw new Seg2Error('truncated', length, `the file ends at byte ${length}, inside the samples of ${which} (bytes ${dataStart} to ${dataStart + needed - 1}); the file was cut short or its sample count (${sampleCount}, at byte ${start + TDB.sampleCount}) is wrong.`);
  }
  if (dataSize > needed && dataStart + dataSize > length) {
    warnings.push({ code: 'seg2-data-size', message: `${which}'s data block says ${dataSize} bytes, more than its ${sampleCount} samples need and past the end of the file; the samples are all present and are read.`, byteOffset: start + TDB.dataSize });
  }
  if (sampleCount === 0) warnings.push({ code: 'seg2-empty-trace', message: `${which} has no samples.`, byteOffset: start + TDB.sampleCount });
  const strings = readStrings(bytes, view, littleEndian, start + TDB.fixedSize, start + blockSize, terminators, warnings);
  const samples = readSamples(view, littleEndian, dataStart, sampleCount, code as Seg2Format);
  let nonFinite = 0;
  for (let k = 0; k < samples.length; k++) if (!Number.isFinite(samples[k])) nonFinite++;
  if (nonFinite > 0) {
    warnings.push({ code: 'seg2-non-finite', message: `${which} holds ${nonFinite} samples that are not numbers (NaN or infinite floats); the trace is treated as dead.`, byteOffset: dataStart });
  }
  return { format: code as Seg2Format, samples, strings };
}

/** The samples of one data block (Pullan 1990 format codes; layout.ts). O(samples). */
function readSamples(view: DataView, littleEndian: boolean, at: number, count: number, format: Seg2Format): Float64Array {
  const out = new Float64Array(count);
  switch (format) {
    case 1:
      for (let k = 0; k < count; k++) out[k] = view.getInt16(at + 2 * k, littleEndian);
      break;
    case 2:
      for (let k = 0; k < count; k++) out[k] = view.getInt32(at + 4 * k, littleEndian);
      break;
    case 4:
      for (let k = 0; k < count; k++) out[k] = view.getFloat32(at + 4 * k, littleEndian);
      break;
    case 5:
      for (let k = 0; k < count; k++) out[k] = view.getFloat64(at + 8 * k, littleEndian);
      break;
  }
  return out;
}
