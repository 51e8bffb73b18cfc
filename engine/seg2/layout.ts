/**
 * The byte layout of a SEG-2 file, as fixed by the standard: Pullan, S.E., 1990,
 * "Recommended standard for seismic (/radar) data files in the personal computer
 * environment", Geophysics 55(9), 1260–1271 (SEG Technical Standards Committee; "SEG-2",
 * revision 1). Offsets are in bytes from the start of the block. Integers are written in
 * the byte order of the machine that wrote the file; the block ids tell which.
 *
 * Where a line below says "from memory", it is our reading of the standard recalled
 * without the text at hand (no copy of the paper in the project); the tests that build
 * files byte by byte (tests/engine/seg2/hand-built.test.ts) follow the same reading.
 */

/** File descriptor block id (Pullan 1990, file descriptor block, bytes 0–1): 3A55 hex read in the file's byte order. */
export const FILE_DESCRIPTOR_ID = 0x3a55;
/** Trace descriptor block id (Pullan 1990, trace descriptor block, bytes 0–1): 4422 hex. */
export const TRACE_DESCRIPTOR_ID = 0x4422;

/**
 * File descriptor block, fixed part (Pullan 1990): 0–1 id, 2–3 revision number, 4–5 size M
 * of the trace pointer sub-block (bytes), 6–7 number of traces N, 8 size of the string
 * terminator (1 or 2), 9–10 its characters, 11 size of the line terminator (0, 1 or 2),
 * 12–13 its characters, 14–31 reserved. The trace pointers (N unsigned 32-bit integers,
 * byte offsets of the trace descriptor blocks from the start of the file) follow at byte
 * 32; the free-format strings of the file at byte 32 + M.
 */
export const FDB = {
  id: 0,
  revision: 2,
  pointerBlockSize: 4,
  traceCount: 6,
  stringTerminatorSize: 8,
  stringTerminator: 9,
  lineTerminatorSize: 11,
  lineTerminator: 12,
  fixedSize: 32,
} as const;

/**
 * Trace descriptor block, fixed part (Pullan 1990): 0–1 id, 2–3 size X of this block
 * (bytes, a multiple of 4, 32 to 65532), 4–7 size Y of the data block that follows it
 * (bytes), 8–11 number of samples NS, 12 data format code, 13–31 reserved; the trace's
 * strings from byte 32 to X − 1; the samples start at byte X of the block.
 */
export const TDB = {
  id: 0,
  blockSize: 2,
  dataSize: 4,
  sampleCount: 8,
  format: 12,
  fixedSize: 32,
} as const;

/**
 * Data format codes (Pullan 1990, trace descriptor block byte 12): 1 = 16-bit fixed point
 * (two's complement), 2 = 32-bit fixed point, 3 = 20-bit floating point (the SEG-D packed
 * format: four samples in 10 bytes), 4 = 32-bit IEEE floating point, 5 = 64-bit IEEE
 * floating point. Bytes per sample of the ones Arcline reads:
 */
export const BYTES_PER_SAMPLE: Readonly<Record<number, number>> = { 1: 2, 2: 4, 4: 4, 5: 8 };

/** The format codes Arcline reads and writes (format 3 is recognised and refused: see README). */
export type Seg2Format = 1 | 2 | 4 | 5;
export const PACKED_20_BIT_FORMAT = 3;

/**
 * The largest block sizes the standard allows (Pullan 1990): the pointer sub-block and a
 * trace descriptor block are sized by 16-bit fields, at most 65532 bytes (a multiple of 4).
 */
export const MAX_BLOCK_SIZE = 65532;

/**
 * Each string (Pullan 1990, free-format section of both descriptor blocks): a 2-byte
 * unsigned integer, then the text "KEYWORD value", then the string terminator. We read the
 * integer as the offset from the start of this string to the start of the next (so the
 * whole entry's length), and an integer 0 as the end of the list (from memory).
 */
export const STRING_OFFSET_BYTES = 2;
