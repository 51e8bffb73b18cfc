/**
 * The free-format strings of a descriptor block (Pullan 1990; layout.ts): each a 2-byte
 * offset to the next string, the text "KEYWORD value", the string terminator; an offset of
 * 0 ends the list. Keywords are separated from their value by blanks. Text is read as
 * Latin-1 so a vendor's stray byte is kept rather than lost (the standard asks for ASCII).
 */
import { STRING_OFFSET_BYTES } from './layout.js';
import type { Terminators } from './read.js';
import type { Seg2String, Seg2Warning } from './types.js';

/**
 * The strings between `start` and `end` (exclusive). A broken chain (an offset too small
 * or running past the block) ends the list with a warning: strings are descriptions, and
 * the keywords Arcline needs are checked where they are used. Each step advances at least
 * 3 bytes, so the loop ends. O(block length).
 */
export function readStrings(
  bytes: Uint8Array,
  view: DataView,
  littleEndian: boolean,
  start: number,
  end: number,
  terminators: Terminators,
  warnings: Seg2Warning[],
): Seg2String[] {
  const strings: Seg2String[] = [];
  let at = start;
  while (at + STRING_OFFSET_BYTES <= end) {
    const offset = view.getUint16(at, littleEndian);
    if (offset === 0) break;
    if (offset <= STRING_OFFSET_BYTES || at + offset > end) {
      warnings.push({
        code: 'seg2-string-chain',
        message: `The string at byte ${at} says the next string is ${offset} bytes further on, ${offset <= STRING_OFFSET_BYTES ? 'too close' : `past the end of its block (byte ${end})`}; the strings from here on are ignored.`,
        byteOffset: at,
      });
      break;
    }
    const text = decodeText(bytes.subarray(at + STRING_OFFSET_BYTES, at + offset), terminators);
    if (text.trim() !== '') strings.push(splitKeyword(text));
    at += offset;
  }
  return strings;
}

/** Text up to the string terminator (or the first NUL), line terminators turned into "\n". */
function decodeText(raw: Uint8Array, terminators: Terminators): string {
  let stop = raw.length;
  const term = terminators.string;
  for (let k = 0; k < raw.length; k++) {
    if (raw[k] === 0 || (term.length > 0 && raw[k] === term[0] && (term.length === 1 || raw[k + 1] === term[1]))) {
      stop = k;
      break;
    }
  }
  let text = '';
  const line = terminators.line;
  for (let k = 0; k < stop; k++) {
    if (line.length > 0 && raw[k] === line[0] && (line.length === 1 || raw[k + 1] === line[1])) {
      text += '\n';
      k += line.length - 1;
    } else text += String.fromCharCode(raw[k]);
  }
  return text;
}

function splitKeyword(text: string): Seg2String {
  const trimmed = text.trim();
  const match = /^(\S+)\s*([\s\S]*)$/.exec(trimmed);
  return match === null ? { keyword: trimmed, value: '' } : { keyword: match[1], value: match[2].trim() };
}
