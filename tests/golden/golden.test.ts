/**
 * Same answers: every sample and every acceptance line, interpreted now, must equal the
 * interpretation recorded in tests/golden/lines/ number for number. The files were
 * recorded from the engine before the pipeline was restructured (one per distinct
 * survey that the reference and engine tests interpret, plus the samples); a change
 * to any of them is made on purpose, with `UPDATE_GOLDEN=1 npx vitest run tests/golden`,
 * and explained in its commit.
 */
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/index.js';
import type { Survey } from '../../engine/index.js';

const dir = fileURLToPath(new URL('./lines/', import.meta.url));
const files = readdirSync(dir).filter((f) => f.endsWith('.json')).sort();

interface GoldenLine {
  name: string;
  source: string;
  survey: Survey;
  interpretation: unknown;
}

/** Every path where two JSON values differ, for a readable failure (first 20). */
function differences(actual: unknown, expected: unknown, path = ''): string[] {
  if (Object.is(actual, expected)) return [];
  if (typeof actual !== 'object' || typeof expected !== 'object' || actual === null || expected === null) {
    return [`${path || '/'}: ${JSON.stringify(expected)} → ${JSON.stringify(actual)}`];
  }
  const keys = new Set([...Object.keys(actual), ...Object.keys(expected)]);
  const out: string[] = [];
  for (const k of keys) {
    out.push(...differences((actual as Record<string, unknown>)[k], (expected as Record<string, unknown>)[k], `${path}/${k}`));
    if (out.length >= 20) break;
  }
  return out;
}

describe('golden lines: the interpretation of every sample and acceptance line is unchanged', () => {
  it('has the recorded lines', () => {
    expect(files.length).toBeGreaterThanOrEqual(60);
  });
  for (const file of files) {
    it(file.replace(/\.json$/, ''), () => {
      const golden = JSON.parse(readFileSync(dir + file, 'utf8')) as GoldenLine;
      // Through JSON, as the service sends it (undefined fields vanish, −0 prints as 0).
      const actual = JSON.parse(JSON.stringify(interpret(golden.survey)));
      if (process.env.UPDATE_GOLDEN) {
        writeFileSync(dir + file, JSON.stringify({ ...golden, interpretation: actual }, null, 1) + '\n');
        return;
      }
      expect(differences(actual, golden.interpretation)).toEqual([]);
    });
  }
});
