/**
 * One benchmark case, run in a worker thread by bench/run.ts so that a case running past
 * its cap can be stopped (worker.terminate()). Builds the survey, then times:
 * - interpret with residuals off: first as soon as the worker has interpreted a small line
 *   40 times (earlyOffMs: runs 41 on, what a worker costs in its first seconds), then in the
 *   steady state (offMs: after running the line itself for WARM_MS or WARM_RUNS, as a
 *   service worker runs it after its first requests of the day; V8 keeps optimising the
 *   engine's functions for hundreds of calls, measured: 24 × 5 costs 1.2 ms in runs 41–240
 *   and 0.86 ms after 300);
 * - interpret with residuals on, in the steady state too (median of 3 to 200 runs, see timed);
 * - JSON.parse of the survey text + JSON.stringify of the result (median of 20, after 200).
 * Posts {offMs, earlyOffMs, onMs, jsonMs, runsOff, runsOn}; posts after each half so a
 * stopped case still reports the half it finished.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { interpret } from '../engine/pipeline/interpret.js';
import type { Survey } from '../engine/survey/survey.js';
import { flatBenchLine, rollingBenchLine } from './lines.js';

export interface CaseSpec {
  kind: 'flat' | 'rolling';
  geophones: number;
  shots: number;
  active?: number;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/**
 * Median wall time of fn, ms: run at least 3 times and for at least 1 s (at most 200 runs),
 * but stop after the first run that ends past 4 s. Small lines are thus timed warm, as a
 * service worker runs them after its first few requests; large ones a few times.
 */
function timed(fn: () => void): { ms: number; runs: number } {
  const ms: number[] = [];
  const start = performance.now();
  const more = (): boolean => {
    const spent = performance.now() - start;
    if (ms.length === 0) return true;
    if (spent > 4000 || ms.length >= 200) return false;
    return ms.length < 3 || spent < 1000;
  };
  while (more()) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  return { ms: median(ms), runs: ms.length };
}

/** Warm-up of a line before its steady-state timing: this long or this many runs, whichever comes first. */
const WARM_MS = 1500;
const WARM_RUNS = 1000;

function warm(fn: () => void): void {
  const start = performance.now();
  for (let r = 0; r < WARM_RUNS && performance.now() - start < WARM_MS; r++) fn();
}

const spec = workerData as CaseSpec;
// Warm-up: let the JIT compile the engine on a small line first (each worker starts cold).
for (let r = 0; r < 40; r++) interpret({ ...flatBenchLine(24, 5), options: { residuals: r % 8 === 7 } });
const survey: Survey = spec.kind === 'flat' ? flatBenchLine(spec.geophones, spec.shots) : rollingBenchLine(spec.geophones, spec.shots, spec.active ?? 48);
const surveyText = JSON.stringify(survey);
const off: Survey = { ...survey, options: { residuals: false } };
const on: Survey = { ...survey, options: { residuals: true } };

let result: unknown = null;
const runOff = (): void => {
  result = interpret(off);
};
const early = timed(runOff);
warm(runOff);
const engineOff = timed(runOff);
for (let r = 0; r < 200; r++) {
  JSON.parse(surveyText);
  JSON.stringify(result);
}
const json: number[] = [];
for (let r = 0; r < 20; r++) {
  const t0 = performance.now();
  JSON.parse(surveyText);
  JSON.stringify(result);
  json.push(performance.now() - t0);
}
const report = { offMs: engineOff.ms, earlyOffMs: early.ms, runsOff: engineOff.runs, jsonMs: median(json), onMs: null as number | null, runsOn: 0, residualsNote: '' };
parentPort?.postMessage(report);
const runOn = (): void => {
  result = interpret(on);
};
warm(runOn);
const engineOn = timed(runOn);
const qc = (result as { qc?: { residuals?: { rmsMs?: number; cellM?: number } | null } }).qc?.residuals;
report.onMs = engineOn.ms;
report.runsOn = engineOn.runs;
report.residualsNote = qc ? `cell ${qc.cellM} m, RMS ${qc.rmsMs} ms` : 'not computed';
parentPort?.postMessage(report);
