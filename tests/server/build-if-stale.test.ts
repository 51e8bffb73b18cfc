// `npm start` builds only when a source is newer than the last good build
// (server/tools/build-if-stale.js). Run on a copy of the tool in a throw-away project of one
// TypeScript file, with this project's node_modules, so the real dist/ is never touched.
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const projectRoot = resolve(new URL('../..', import.meta.url).pathname);

describe('build-if-stale', () => {
  let root: string;
  const run = (...args: string[]): { status: number | null; stderr: string } => {
    const result = spawnSync(process.execPath, [join(root, 'server', 'tools', 'build-if-stale.js'), ...args], { cwd: root, encoding: 'utf8' });
    return { status: result.status, stderr: result.stderr };
  };
  const source = (): string => join(root, 'server', 'main.ts');
  const output = (): string => join(root, 'dist', 'server', 'main.js');
  const stamp = (): string => join(root, 'dist', '.build-stamp');
  /** Moves a file's modification time by seconds (mtime resolution differs between file systems). */
  const age = (path: string, seconds: number): void => {
    const when = new Date(statSync(path).mtimeMs + seconds * 1000);
    utimesSync(path, when, when);
  };

  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'arcline-build-'));
    mkdirSync(join(root, 'server', 'tools'), { recursive: true });
    copyFileSync(join(projectRoot, 'server', 'tools', 'build-if-stale.js'), join(root, 'server', 'tools', 'build-if-stale.js'));
    writeFileSync(join(root, 'package.json'), JSON.stringify({ type: 'module' }));
    writeFileSync(
      join(root, 'tsconfig.json'),
      JSON.stringify({ compilerOptions: { strict: true, module: 'NodeNext', moduleResolution: 'NodeNext', target: 'ES2022', lib: ['ES5'], skipLibCheck: true, outDir: 'dist', rootDir: '.', types: [] }, include: ['server'] }),
    );
    writeFileSync(source(), 'export const answer: number = 1;\n');
    symlinkSync(join(projectRoot, 'node_modules'), join(root, 'node_modules'), 'dir');
    // The inputs must all be older than the first build's stamp.
    for (const path of [source(), join(root, 'tsconfig.json'), join(root, 'package.json'), join(root, 'server', 'tools', 'build-if-stale.js')]) age(path, -60);
  });
  afterAll(() => {
    if (root) rmSync(root, { recursive: true, force: true });
  });

  it('builds when there is no build, then not again while nothing changed', () => {
    const first = run();
    expect(first.status).toBe(0);
    expect(first.stderr).toContain('building (no build yet)');
    expect(readFileSync(output(), 'utf8')).toContain('answer = 1');
    expect(existsSync(stamp())).toBe(true);

    const second = run();
    expect(second.status).toBe(0);
    expect(second.stderr).not.toContain('building');
    // --always builds although nothing changed (npm run build).
    expect(run('--always').stderr).toContain('building (asked for)');
  }, 60_000);

  it('builds again when a source is newer than the stamp', () => {
    writeFileSync(source(), 'export const answer: number = 2;\n');
    age(source(), 5);
    const result = run();
    expect(result.status).toBe(0);
    expect(result.stderr).toContain('sources changed');
    expect(readFileSync(output(), 'utf8')).toContain('answer = 2');
  }, 60_000);

  it('a failed build exits non-zero and leaves the build stale, so the next start tries again', () => {
    const stampBefore = statSync(stamp()).mtimeMs;
    writeFileSync(source(), 'export const answer: number = "not a number";\n');
    age(source(), 10);
    const failed = run();
    expect(failed.status).not.toBe(0);
    expect(failed.stderr).toContain('the build failed');
    expect(statSync(stamp()).mtimeMs).toBe(stampBefore);
    const again = run();
    expect(again.stderr).toContain('sources changed');
  }, 60_000);
});
