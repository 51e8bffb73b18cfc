/**
 * The pick-table reader survives corrupted files: seeded random edits of the demo pick
 * table (bytes replaced, lines dropped or doubled, quotes and separators inserted, the file
 * cut short) must give either a survey that validates or problems with a path and a
 * sentence, never an exception (STYLE.md: a reader of a field format is fuzzed).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importPickTable } from '../../engine/survey/csv-import.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import { mulberry32 } from '../helpers/random.js';

const demoCsv = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');
const JUNK = ['"', ',', '\n', '\r\n', '#', ' ', '-', '.', 'e', 'NaN', '1e400', '\u0000', '\ufeff', 'é'];

function corrupt(text: string, rng: () => number): string {
  let out = text;
  const edits = 1 + Math.floor(rng() * 6);
  for (let e = 0; e < edits; e++) {
    const at = Math.floor(rng() * out.length);
    const kind = Math.floor(rng() * 5);
    if (kind === 0) out = out.slice(0, at) + JUNK[Math.floor(rng() * JUNK.length)] + out.slice(at + 1);
    else if (kind === 1) out = out.slice(0, at) + JUNK[Math.floor(rng() * JUNK.length)] + out.slice(at);
    else if (kind === 2) out = out.slice(0, at);
    else {
      const lines = out.split('\n');
      const k = Math.floor(rng() * lines.length);
      if (kind === 3) lines.splice(k, 1);
      else lines.splice(k, 0, lines[k] ?? '');
      out = lines.join('\n');
    }
  }
  return out;
}

describe('importPickTable on seeded corruptions of the demo pick table', () => {
  for (let seed = 1; seed <= 80; seed++) {
    it(`seed ${seed}: a valid survey or problems, never a throw`, () => {
      const text = corrupt(demoCsv, mulberry32(seed));
      const result = importPickTable(text);
      if (result.survey) {
        expect(validateSurvey(result.survey).problems).toEqual([]);
      } else {
        expect(result.problems.length).toBeGreaterThan(0);
        for (const p of result.problems) {
          expect(typeof p.path).toBe('string');
          expect(p.message.length).toBeGreaterThan(10);
        }
      }
    });
  }
});
