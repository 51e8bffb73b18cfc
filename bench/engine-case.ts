/**
 * One benchmark case, run in a worker thread by bench/run.ts so that a case running past
 * its cap can be stopped (worker.terminate()). Builds the survey, then times:
 * - interpret with residuals off and on (median of up to 3 runs within a few seconds);
 * - JSON.parse of the survey text + JSON.stringify of the result (median of 20).
 * A small line is interpreted first so that the JIT has compiled the engine.
 * Posts {offMs, onMs, jsonMs, runsOff, runsOn}; posts after each half so a stopped case
 * still reports the half it finished.
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

/** Runs fn up to 3 times, stopping early once 4 s have passed; median wall time, ms. */
function timed(fn: () => void): { ms: number; runs: number } {
  const ms: number[] = [];
  const start = performance.now();
  while (ms.length < 3 && (ms.length === 0 || performance.now() - start < 4000)) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  return { ms: median(ms), runs: ms.length };
}

const spec = workerData as CaseSpec;
// Warm-up: let the JIT compile the engine on a small line first (each worker starts cold).
for (const residuals of [false, true, false]) interpret({ ...flatBenchLine(24, 5), options: { residuals } });
const survey: Survey = spec.kind === 'flat' ? flatBenchLine(spec.geophones, spec.shots) : rollingBenchLine(spec.geophones, spec.shots, spec.active ?? 48);
const surveyText = JSON.stringify(survey);
const off: Survey = { ...survey, options: { residuals: false } };
const on: Survey = { ...survey, options: { residuals: true } };

let result: unknown = null;
const engineOff = timed(() => {
  result = interpret(off);
});
const json: number[] = [];
for (let r = 0; r < 20; r++) {
  const t0 = performance.now();
  JSON.parse(surveyText);
  JSON.stringify(result);
  json.push(performance.now() - t0);
}
const report = { offMs: engineOff.ms, runsOff: engineOff.runs, jsonMs: median(json), onMs: null as number | null, runsOn: 0, residualsNote: '' };
parentPort?.postMessage(report);
const engineOn = timed(() => {
  result = interpret(on);
});
const qc = (result as { qc?: { residuals?: { rmsMs?: number; cellM?: number } | null } }).qc?.residuals;
report.onMs = engineOn.ms;
report.runsOn = engineOn.runs;
report.residualsNote = qc ? `cell ${qc.cellM} m, RMS ${qc.rmsMs} ms` : 'not computed';
parentPort?.postMessage(report);
