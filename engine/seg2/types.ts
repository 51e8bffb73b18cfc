/** What the SEG-2 reader gives and the writer takes (layout in layout.ts). */
import type { Seg2Format } from './layout.js';

/** One free-format string of a descriptor block: its keyword (upper case by the standard) and the rest of the text. */
export interface Seg2String {
  keyword: string;
  value: string;
}

export interface Seg2Trace {
  /** Data format code (layout.ts). */
  format: Seg2Format;
  /** The samples as written (integers for formats 1 and 2), not descaled. */
  samples: Float64Array;
  /** The trace descriptor block's strings, in file order. */
  strings: Seg2String[];
}

export interface Seg2File {
  /** True when the block ids read as 3A55 little-endian (bytes 55 3A). */
  littleEndian: boolean;
  /** Revision number (file descriptor bytes 2–3); the standard is revision 1. */
  revision: number;
  /** The file descriptor block's strings, in file order. */
  strings: Seg2String[];
  traces: Seg2Trace[];
}

/** Something odd but readable, with the byte where it was seen. */
export interface Seg2Warning {
  code: string;
  message: string;
  byteOffset: number;
}

/** A file that cannot be read: the byte offset and the problem, in words. */
export class Seg2Error extends Error {
  readonly byteOffset: number;
  readonly code: string;
  constructor(code: string, byteOffset: number, problem: string) {
    super(`SEG-2 file, byte ${byteOffset}: ${problem}`);
    this.name = 'Seg2Error';
    this.code = code;
    this.byteOffset = byteOffset;
  }
}

/** First value of a keyword in a string list (keywords compared in upper case), or undefined. */
export function stringValue(strings: readonly Seg2String[], keyword: string): string | undefined {
  const wanted = keyword.toUpperCase();
  return strings.find((s) => s.keyword.toUpperCase() === wanted)?.value;
}
