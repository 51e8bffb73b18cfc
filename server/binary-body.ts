/**
 * Recognises a body that is a file rather than survey text (a seismograph record, a
 * spreadsheet workbook, a PDF, UTF-16 text), so the answer can say what was sent and where
 * it belongs instead of quoting garbage back. Reads at most BINARY_SNIFF_BYTES of the body;
 * the answer never contains a byte of it.
 */

/** What a binary body is, with the sentence that says so and what to do instead. */
export interface BinaryBody {
  kind: 'seg2' | 'zip' | 'ole2' | 'pdf' | 'gzip' | 'utf16' | 'binary';
  message: string;
}

/** Bytes looked at: git's binary test looks for a NUL in the first 8000 bytes (from memory); we do the same. */
export const BINARY_SNIFF_BYTES = 8000;

const SEND_PICKS =
  'Send the picks as a pick table (Content-Type: text/csv; columns shot_id, shot_x_m, shot_elevation_m, geophone_x_m, geophone_elevation_m, time_ms) or as a survey document (application/json), both described in the README.';

/**
 * The SEG-2 file descriptor block (Pullan 1990, "Recommended standard for seismic (/radar)
 * data files in the personal computer environment", Geophysics 55(9)): bytes 0–1 are the
 * block id 0x3a55 in the file's own byte order (so 55 3a little-endian, 3a 55 big-endian),
 * bytes 2–3 the format revision, 4–5 the size of the trace pointer sub-block, 6–7 the
 * number of traces.
 */
function seg2(body: Buffer): BinaryBody | null {
  if (body.length < 2) return null;
  const little = body[0] === 0x55 && body[1] === 0x3a;
  const big = body[0] === 0x3a && body[1] === 0x55;
  if (!little && !big) return null;
  const traces = body.length >= 8 ? (little ? body.readUInt16LE(6) : body.readUInt16BE(6)) : null;
  const what = traces !== null && traces > 0 ? `a SEG-2 seismograph file (a shot record of ${traces} traces)` : 'a SEG-2 seismograph file (a shot record)';
  return {
    kind: 'seg2',
    message:
      `This body is ${what}: raw traces, not first-break picks. Send it to POST /api/v1/gathers/picks ` +
      `(raw bytes, Content-Type: application/octet-stream) for its automatic first breaks. ${SEND_PICKS}`,
  };
}

/** Other files a user may pick by mistake, by their leading bytes (each format's published signature). */
const SIGNATURES: { kind: BinaryBody['kind']; bytes: number[]; what: string; instead: string }[] = [
  { kind: 'zip', bytes: [0x50, 0x4b, 0x03, 0x04], what: 'a ZIP archive (a spreadsheet workbook such as .xlsx or .ods is one)', instead: 'Save the sheet of picks as CSV (comma-separated, UTF-8) and send that.' },
  { kind: 'ole2', bytes: [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1], what: 'an old-style Office document (such as an .xls workbook)', instead: 'Save the sheet of picks as CSV (comma-separated, UTF-8) and send that.' },
  { kind: 'pdf', bytes: [0x25, 0x50, 0x44, 0x46, 0x2d], what: 'a PDF document', instead: 'Send the picks themselves, not a report of them.' },
  { kind: 'gzip', bytes: [0x1f, 0x8b], what: 'a gzip-compressed file', instead: 'Uncompress it first.' },
  { kind: 'utf16', bytes: [0xff, 0xfe], what: 'UTF-16 text ("Unicode text" from a spreadsheet)', instead: 'Save it as CSV in UTF-8.' },
  { kind: 'utf16', bytes: [0xfe, 0xff], what: 'UTF-16 text ("Unicode text" from a spreadsheet)', instead: 'Save it as CSV in UTF-8.' },
];

function startsWith(body: Buffer, bytes: number[]): boolean {
  return body.length >= bytes.length && bytes.every((b, i) => body[i] === b);
}

/** A NUL byte in the first BINARY_SNIFF_BYTES: no CSV or JSON text holds one. O(min(n, 8000)). */
function hasNul(body: Buffer): boolean {
  const end = Math.min(body.length, BINARY_SNIFF_BYTES);
  for (let i = 0; i < end; i++) if (body[i] === 0) return true;
  return false;
}

/** What the body is when it is not text; null for text (which the survey's door then reads). */
export function binaryBody(body: Buffer): BinaryBody | null {
  const seismograph = seg2(body);
  if (seismograph !== null) return seismograph;
  for (const signature of SIGNATURES) {
    if (startsWith(body, signature.bytes)) {
      return { kind: signature.kind, message: `This body is ${signature.what}, not a survey or a pick table. ${signature.instead} ${SEND_PICKS}` };
    }
  }
  if (hasNul(body)) {
    return { kind: 'binary', message: `This body is binary data, not text, so it is neither a survey nor a pick table. ${SEND_PICKS}` };
  }
  return null;
}
