/**
 * Writes the invented demo lines to samples/ as JSON survey documents and CSV pick tables:
 * samples/demo-line.json, samples/demo-line.csv, samples/flat-line.json, samples/flat-line.csv,
 * and Demo A's shot gathers as SEG-2 files, samples/demo-line-<shot>.sg2 (invented data,
 * engine/samples/demo-gathers.ts).
 *
 * Run after a build: `node dist/server/tools/write-samples.js` (npm script `samples`).
 * The files are derived data; tests/engine/samples.test.ts fails when they drift from
 * engine/samples/demo-lines.ts, and this tool brings them back in line.
 */
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { demoLine, flatLine } from '../../engine/samples/demo-lines.js';
import { demoGathers } from '../../engine/samples/demo-gathers.js';
import { surveyToPickTable } from '../../engine/survey/csv-import.js';
import type { Survey } from '../../engine/survey/survey.js';

/** The project root: the nearest folder above this file that holds package.json (works from dist/ or source). */
function projectRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    if (existsSync(join(dir, 'package.json'))) return dir;
    const parent = dirname(dir);
    if (parent === dir) throw new Error('write-samples: cannot find package.json above ' + fileURLToPath(import.meta.url));
    dir = parent;
  }
}

/** The JSON text of a sample, as the tests expect it: two-space indent, final newline. */
export function sampleJson(survey: Survey): string {
  return `${JSON.stringify(survey, null, 2)}\n`;
}

export function writeSamples(root: string): string[] {
  const dir = resolve(root, 'samples');
  mkdirSync(dir, { recursive: true });
  const written: string[] = [];
  for (const [stem, survey] of [
    ['demo-line', demoLine()],
    ['flat-line', flatLine()],
  ] as const) {
    const jsonPath = join(dir, `${stem}.json`);
    const csvPath = join(dir, `${stem}.csv`);
    writeFileSync(jsonPath, sampleJson(survey));
    writeFileSync(csvPath, surveyToPickTable(survey));
    written.push(jsonPath, csvPath);
  }
  for (const gather of demoGathers()) {
    const path = join(dir, gather.fileName);
    writeFileSync(path, gather.bytes);
    written.push(path);
  }
  return written;
}

// Only write when run as a program, not when imported.
if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  for (const path of writeSamples(projectRoot())) console.log(`wrote ${path}`);
}
