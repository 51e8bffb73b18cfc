#!/usr/bin/env node
/**
 * Compiles the TypeScript into dist/ only when a source is newer than the last good build,
 * so `npm start` starts in about a second instead of waiting for tsc every time (tsc over
 * the whole project takes tens of seconds on a shared office machine).
 *
 *   node server/tools/build-if-stale.js            build when stale (npm start, npm install/ci via "prepare")
 *   node server/tools/build-if-stale.js --always   build regardless (npm run build)
 *
 * Stale means: no stamp in dist/, or any input modified after the stamp. Inputs are every
 * file under the folders tsconfig.json includes and web/ (the server imports
 * web/station-columns.js), tsconfig.json, package.json and node_modules/.package-lock.json
 * (npm rewrites it on every install, so a new compiler or new type packages rebuild once).
 * The stamp is written only after tsc succeeds, with the time the build started, so a
 * failed build or an edit made during the build is built again next time.
 * Cost: one stat per file of those folders (a few hundred; milliseconds).
 *
 * Plain JavaScript on purpose: it must run before anything is compiled.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const stampPath = join(root, 'dist', '.build-stamp');

/** Folders whose files are compiled or imported by compiled code. */
function inputFolders() {
  const tsconfig = JSON.parse(readFileSync(join(root, 'tsconfig.json'), 'utf8'));
  const included = Array.isArray(tsconfig.include) ? tsconfig.include : [];
  return [...new Set([...included, 'web'])].map((folder) => join(root, folder));
}

/** Newest modification time (ms) of the files under a folder; 0 when it does not exist. O(files). */
function newestUnder(folder) {
  if (!existsSync(folder)) return 0;
  let newest = 0;
  for (const entry of readdirSync(folder, { withFileTypes: true })) {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) newest = Math.max(newest, newestUnder(path));
    else if (entry.isFile()) newest = Math.max(newest, statSync(path).mtimeMs);
  }
  return newest;
}

function newestInput() {
  const files = ['tsconfig.json', 'package.json', join('node_modules', '.package-lock.json')].map((file) => join(root, file));
  let newest = 0;
  for (const file of files) if (existsSync(file)) newest = Math.max(newest, statSync(file).mtimeMs);
  for (const folder of inputFolders()) newest = Math.max(newest, newestUnder(folder));
  return newest;
}

function stale() {
  if (!existsSync(stampPath) || !existsSync(join(root, 'dist', 'server', 'main.js'))) return 'no build yet';
  const built = statSync(stampPath).mtimeMs;
  return newestInput() > built ? 'sources changed since the last build' : null;
}

function build(reason) {
  let tsc;
  try {
    tsc = createRequire(import.meta.url).resolve('typescript/bin/tsc');
  } catch {
    console.error('arcline: the TypeScript compiler is not installed; run `npm ci` first (it installs and builds).');
    process.exit(1);
  }
  console.error(`arcline: building (${reason}) …`);
  const startedAt = new Date();
  const started = Date.now();
  const result = spawnSync(process.execPath, [tsc, '-p', join(root, 'tsconfig.json')], { cwd: root, stdio: 'inherit' });
  if (result.status !== 0) {
    console.error('arcline: the build failed (see above); nothing was started.');
    process.exit(result.status ?? 1);
  }
  mkdirSync(dirname(stampPath), { recursive: true });
  writeFileSync(stampPath, `${startedAt.toISOString()}\n`);
  utimesSync(stampPath, startedAt, startedAt);
  console.error(`arcline: built in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
}

const always = process.argv.includes('--always');
const reason = always ? 'asked for' : stale();
if (reason !== null) build(reason);
