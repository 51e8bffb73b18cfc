/**
 * npm run bench. The parts, each bounded in time:
 * 1. The engine table (issue 9): interpret with residuals off and on for flat two-layer
 *    lines of 24 … 1024 geophones (5 shots), 96 geophones with 10 … 64 shots, a rolling
 *    line of 240 geophones with 24 shots and the largest line, 1024 × 64 (last, so the
 *    budget never skips the others); beside each, JSON parse + serialise of the same
 *    survey and result and the ratio; then the growth exponents (log-log slopes). Each case
 *    runs in a worker thread, stopped at a cap (CASE_CAP_MS per case) and skipped once
 *    the table has used TABLE_BUDGET_MS; the table says so.
 * 2. Former against current code in the same run: the jump scan (dense 3×3 solve per
 *    candidate and hinge, bench/former/jump-scan.ts) and the reciprocal adjustment
 *    (k solves for the variances, bench/former/reciprocal-adjustment.ts).
 * 3. SEG-2 gathers (issue 12): read and pick 48 traces × 4,000 samples × 11 shots (gathers.ts).
 * 4. The forward model: solver speed on the production grid, a whole synthetic line, and
 *    the residual check against interpret.
 * Speed is never asserted in tests. Wall times on a shared machine are noisy: compare
 * ratios within one run.
 */
import { arch, cpus, loadavg, totalmem } from 'node:os';
import { Worker } from 'node:worker_threads';
import { solveFirstArrivals } from '../engine/forward/eikonal.js';
import { buildVelocityGrid, type LayeredModel } from '../engine/forward/model.js';
import { syntheticSurvey } from '../engine/forward/synthetic.js';
import { interpret } from '../engine/pipeline/interpret.js';
import { withResiduals } from '../engine/qc/residuals.js';
import { adjustReciprocalTimes, type AdjustablePair } from '../engine/reciprocal/reciprocal-adjustment.js';
import { scanForJumps } from '../engine/structure/jump-scan.js';
import { demoLine } from '../engine/samples/demo-lines.js';
import type { Survey } from '../engine/survey/survey.js';
import type { CaseSpec } from './engine-case.js';
import { WORKER_RESOURCE_LIMITS } from '../server/compute/pool.js';
import { adjustReciprocalTimes as formerAdjust, type AdjustablePair as FormerPair } from './former/reciprocal-adjustment.js';
import { fromNullable } from '../engine/shared/nan-none.js';
import { scanForJumps as formerScan } from './former/jump-scan.js';
import { timeTermBench } from './time-term.js';
import { gatherBench } from './gathers.js';

/** Longest one case may run (residuals off and on together), ms. */
const CASE_CAP_MS = 45_000;
/** Once the table has taken this long, the remaining cases are skipped, ms. */
const TABLE_BUDGET_MS = 180_000;

interface CaseReport {
  offMs: number;
  /** Residuals off in the worker's first runs (after 40 of a small line), before the line itself is warm. */
  earlyOffMs: number;
  runsOff: number;
  jsonMs: number;
  onMs: number | null;
  runsOn: number;
  residualsNote: string;
}

/** Runs one case in a worker; resolves with what it reported before finishing or being stopped at capMs. */
function runCase(spec: CaseSpec, capMs: number): Promise<{ report: CaseReport | null; stopped: boolean }> {
  return new Promise((resolve) => {
    // The same memory limits as the service's compute workers, so the table measures what they do.
    const worker = new Worker(new URL('./engine-case.js', import.meta.url), { workerData: spec, resourceLimits: WORKER_RESOURCE_LIMITS });
    let report: CaseReport | null = null;
    let stopped = false;
    const timer = setTimeout(() => {
      stopped = true;
      void worker.terminate();
    }, capMs);
    worker.on('message', (m: CaseReport) => {
      report = m;
    });
    worker.on('error', (e) => console.log(`  case failed: ${String(e)}`));
    worker.on('exit', () => {
      clearTimeout(timer);
      resolve({ report, stopped });
    });
  });
}

/** Least-squares slope of ln(time) against ln(size). */
function logLogSlope(points: { size: number; ms: number }[]): number | null {
  if (points.length < 2) return null;
  const lx = points.map((p) => Math.log(p.size));
  const ly = points.map((p) => Math.log(p.ms));
  const mx = lx.reduce((a, b) => a + b, 0) / lx.length;
  const my = ly.reduce((a, b) => a + b, 0) / ly.length;
  let sxy = 0;
  let sxx = 0;
  lx.forEach((x, i) => {
    sxy += (x - mx) * (ly[i] - my);
    sxx += (x - mx) ** 2;
  });
  return sxy / sxx;
}

const fmt = (ms: number | null): string => (ms === null ? '—' : ms >= 100 ? ms.toFixed(0) : ms.toFixed(1));

async function engineTable(): Promise<void> {
  const cases: (CaseSpec & { label: string })[] = [
    ...[24, 48, 96, 192, 480, 1024].map((g) => ({ kind: 'flat' as const, geophones: g, shots: 5, label: `flat ${g} × 5` })),
    ...[10, 20, 40, 64].map((s) => ({ kind: 'flat' as const, geophones: 96, shots: s, label: `flat 96 × ${s}` })),
    { kind: 'rolling', geophones: 240, shots: 24, active: 48, label: 'rolling 240 × 24 (48 live)' },
    // The largest line the service takes (SURVEY_LIMITS): the 2 s target of issue 9.
    { kind: 'flat', geophones: 1024, shots: 64, label: 'flat 1024 × 64' },
  ];
  console.log('## Engine time (interpret, wall median of 3 to 200 runs, steady state: after the line ran 1.5 s or 1,000 times) against JSON parse + serialise');
  console.log('| line (geophones × shots) | residuals off, ms | residuals on, ms | on/off | JSON, ms | off/JSON | on/JSON | off in the first runs, ms (/JSON) | residual grid |');
  console.log('|---|---|---|---|---|---|---|---|---|');
  const start = performance.now();
  const byGeophones: { size: number; ms: number }[] = [];
  const byShots: { size: number; ms: number }[] = [];
  for (const c of cases) {
    if (performance.now() - start > TABLE_BUDGET_MS) {
      console.log(`| ${c.label} | skipped: the table's ${TABLE_BUDGET_MS / 1000} s budget is spent | | | | | | | |`);
      continue;
    }
    const { report: r, stopped } = await runCase(c, CASE_CAP_MS);
    if (!r) {
      console.log(`| ${c.label} | over ${CASE_CAP_MS / 1000} s: stopped | | | | | | | |`);
      continue;
    }
    const on = r.onMs === null ? (stopped ? `stopped at the ${CASE_CAP_MS / 1000} s cap` : '—') : fmt(r.onMs);
    const ratio = (a: number | null, b: number): string => (a === null ? '—' : (a / b).toFixed(a / b >= 10 ? 0 : 2));
    console.log(`| ${c.label} | ${fmt(r.offMs)} | ${on} | ${ratio(r.onMs, r.offMs)} | ${r.jsonMs.toFixed(2)} | ${ratio(r.offMs, r.jsonMs)} | ${ratio(r.onMs, r.jsonMs)} | ${fmt(r.earlyOffMs)} (${ratio(r.earlyOffMs, r.jsonMs)}) | ${r.residualsNote} |`);
    if (c.kind === 'flat' && c.shots === 5 && c.geophones <= 480) byGeophones.push({ size: c.geophones, ms: r.offMs });
    if (c.kind === 'flat' && c.geophones === 96) byShots.push({ size: c.shots, ms: r.offMs });
  }
  const g = logLogSlope(byGeophones);
  const s = logLogSlope(byShots);
  console.log(`Growth exponent in geophones, 24 → 480, 5 shots, residuals off (log-log slope): ${g === null ? '—' : g.toFixed(2)}` +
    (byGeophones.length >= 2 ? `; end to end ${(Math.log(byGeophones[byGeophones.length - 1].ms / byGeophones[0].ms) / Math.log(byGeophones[byGeophones.length - 1].size / byGeophones[0].size)).toFixed(2)}` : ''));
  console.log(`Growth exponent in shots, 96 geophones, 5 → 64 shots, residuals off: ${s === null ? '—' : s.toFixed(2)}`);
  console.log(`Table time ${((performance.now() - start) / 1000).toFixed(0)} s.`);
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Median wall time of fn over `repeats` runs, ms. */
function timeIt(fn: () => void, repeats: number): number {
  const ms: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  return median(ms);
}

/** A seeded uniform generator (mulberry32) so the compared inputs are the same every run. */
function uniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A delay-time-like profile: 0.4 ms/m trend, a 1.5 ms step at 60 %, 0.1 ms noise; 3 m spacing. */
function stepProfile(n: number): { x: number[]; y: number[] } {
  const rng = uniform(n);
  const x = Array.from({ length: n }, (_, i) => 3 * i);
  const y = x.map((xi) => 10 + 0.004 * xi + (xi > 0.6 * x[n - 1] ? 1.5 : 0) + 0.1 * (rng() + rng() + rng() - 1.5));
  return { x, y };
}

/** k pairs over g geophones, each covering a random run, with random reading errors and variances (nullable, as the former code takes them). */
function randomPairs(k: number, g: number): FormerPair[] {
  const rng = uniform(k * 7919 + g);
  return Array.from({ length: k }, () => {
    const from = Math.floor(rng() * g * 0.6);
    const to = from + 2 + Math.floor(rng() * (g - from - 2));
    const variance = 0.01 + 10 * rng() * rng();
    const error = 3 * (rng() - 0.5);
    return {
      plusTimeMs: Array.from({ length: g }, (_, i) => (i >= from && i <= to ? 10 + 0.3 * i - error + 0.1 * (rng() - 0.5) : null)),
      plusVarianceMs2: Array.from({ length: g }, (_, i) => (i >= from && i <= to ? variance + 0.1 : null)),
      reciprocalTimeMs: 40 + error,
      reciprocalVarianceMs2: variance,
    };
  });
}

function formerAgainstCurrent(): void {
  console.log('');
  console.log('## Former against current code, same run (wall medians)');
  console.log('| step | size | former, ms | current, ms | former/current |');
  console.log('|---|---|---|---|---|');
  const opts = { sigma: 0.1, rampWidthAt: () => 9, sidePoints: 8, minSidePoints: 3, falseAlarmProbability: 0.01 };
  for (const n of [24, 96, 480, 1024]) {
    const { x, y } = stepProfile(n);
    scanForJumps(x, y, opts);
    const current = timeIt(() => scanForJumps(x, y, opts), 5);
    // The former scan is O(n·m²) per profile with allocation per fit: cap its repeats.
    formerScan(x, y, opts);
    const former = timeIt(() => formerScan(x, y, opts), n >= 480 ? 1 : 3);
    console.log(`| jump scan (one profile, 4 widths) | ${n} points | ${fmt(former)} | ${fmt(current)} | ${(former / current).toFixed(0)} |`);
  }
  for (const k of [10, 45, 100, 200, 400]) {
    const g = 96;
    const run = (adjust: (p: FormerPair[]) => void): number => timeIt(() => adjust(randomPairs(k, g)), k >= 200 ? 1 : 3);
    // The current code takes arrays of doubles with NaN for none (engine/shared/nan-none.ts): converted inside the timing, as building the pairs is.
    const current = (): void => adjustReciprocalTimes(randomPairs(k, g).map((p): AdjustablePair => ({ ...p, plusTimeMs: fromNullable(p.plusTimeMs), plusVarianceMs2: fromNullable(p.plusVarianceMs2) })));
    timeIt(current, 1); // warm-up
    const currentMs = timeIt(current, k >= 200 ? 1 : 3);
    // The former is O(k⁴): above 200 pairs it would run for minutes.
    const former = k <= 200 ? run(formerAdjust) : null;
    console.log(`| reciprocal adjustment (incl. building the pairs) | ${k} pairs × ${g} geophones | ${former === null ? 'not run (O(k⁴))' : fmt(former)} | ${fmt(currentMs)} | ${former === null ? '—' : (former / currentMs).toFixed(0)} |`);
  }
}

const model: LayeredModel = {
  surface: [
    { x: -10, elevation: 100 },
    { x: 60, elevation: 103 },
    { x: 130, elevation: 101 },
    { x: 210, elevation: 106 },
  ],
  layers: [
    { velocity: { contactsX: [90], velocities: [550, 650] } },
    {
      velocity: 1600,
      top: [
        { x: -10, elevation: 96 },
        { x: 210, elevation: 99 },
      ],
    },
    {
      velocity: { contactsX: [140], velocities: [2800, 3600] },
      top: [
        { x: -10, elevation: 88 },
        { x: 100, elevation: 86 },
        { x: 100.2, elevation: 82 },
        { x: 210, elevation: 84 },
      ],
    },
  ],
};

const extent = { xMin: 0, xMax: 200, zMin: 67, zMax: 107, cellM: 0.25 };

/** CPU time of this process, ms: less disturbed than wall time when other jobs share the cores. */
function cpuMs(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

function timeSolves(order: 1 | 2, repeats: number): { wall: number[]; cpu: number } {
  const grid = buildVelocityGrid(model, extent);
  const shotXs = [1, 40, 100, 160, 199];
  const ms: number[] = [];
  const c0 = cpuMs();
  for (let r = 0; r < repeats; r++) {
    for (const x of shotXs) {
      const z = 100 + 3 * (x / 60); // close to the surface; exact elevation not needed for timing
      const source = { x, z: Math.min(z, 100.5) };
      const t0 = performance.now();
      solveFirstArrivals(grid, source, { order });
      ms.push(performance.now() - t0);
    }
  }
  return { wall: ms, cpu: (cpuMs() - c0) / ms.length };
}

function forwardModel(): void {
  const grid = buildVelocityGrid(model, extent);
  const nodes = grid.nx * grid.nz;
  const b0 = performance.now();
  for (let r = 0; r < 5; r++) buildVelocityGrid(model, extent);
  const buildMs = (performance.now() - b0) / 5;
  console.log(`Grid: ${grid.nx} × ${grid.nz} = ${nodes} nodes (200 m × 40 m at 0.25 m); build ${buildMs.toFixed(1)} ms`);

  timeSolves(2, 2); // warm-up: let the JIT compile the hot loop
  for (const order of [2, 1] as const) {
    const { wall: ms, cpu } = timeSolves(order, 6);
    const med = median(ms);
    console.log(
      `Solver, order ${order}: wall median ${med.toFixed(1)} ms per shot (min ${Math.min(...ms).toFixed(1)}, max ${Math.max(...ms).toFixed(1)}), ` +
        `CPU ${cpu.toFixed(1)} ms per shot; ${((nodes / Math.min(...ms)) * 1000 / 1e6).toFixed(2)} million nodes per second per shot at the best wall time`,
    );
  }

  const layout = {
    geophoneCount: 48,
    firstX: 6,
    spacing: 4,
    shots: [{ x: 0 }, { x: 4 }, { x: 52 }, { x: 100 }, { x: 148 }, { x: 196 }, { x: 200 }],
  };
  syntheticSurvey(model, layout, { noiseMs: 0.2, seed: 1 }); // warm-up
  const lineMs: number[] = [];
  const c0 = cpuMs();
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    syntheticSurvey(model, layout, { noiseMs: 0.2, seed: r });
    lineMs.push(performance.now() - t0);
  }
  const lineCpu = (cpuMs() - c0) / lineMs.length;
  const line = median(lineMs);
  console.log(
    `Line of 48 geophones and 7 shots (grid build + 7 solves + sampling): wall median ${line.toFixed(1)} ms (best ${Math.min(...lineMs).toFixed(1)}), ` +
      `CPU ${lineCpu.toFixed(1)} ms; ${(line / 7).toFixed(1)} ms per shot (wall median)`,
  );
  residualsCost('Demo A (24 geophones, 5 shots)', demoLine());
  residualsCost('48 geophones, 7 shots (the line above)', syntheticSurvey(model, layout, { noiseMs: 0.2, seed: 1 }));
  console.log('Target: under 50 ms per shot.');
}

/**
 * Cost of the residuals check (engine/residuals.ts) against the cost of interpret without
 * it, measured in the same run: median over 21 repeats of interpret({residuals: false}) and
 * of withResiduals on that interpretation, after both have run for about a second (a single
 * warm-up call left interpret far from its steady cost: 5–7 ms against about 1 ms for Demo A).
 */
function residualsCost(label: string, survey: Survey): void {
  const plainSurvey: Survey = { ...survey, options: { ...survey.options, residuals: false } };
  const warmUntil = performance.now() + 1000;
  for (let r = 0; r < 1000 && performance.now() < warmUntil; r++) withResiduals(survey, interpret(plainSurvey));
  const interpretMs: number[] = [];
  const residualMs: number[] = [];
  let info = '';
  for (let r = 0; r < 21; r++) {
    const t0 = performance.now();
    const plain = interpret(plainSurvey);
    const t1 = performance.now();
    const checked = withResiduals(survey, plain);
    interpretMs.push(t1 - t0);
    residualMs.push(performance.now() - t1);
    const res = checked.qc.residuals as { rmsMs: number; cellM?: number } | undefined;
    info = res ? `cell ${res.cellM} m, RMS ${res.rmsMs} ms` : 'not computed';
  }
  const i = median(interpretMs);
  const m = median(residualMs);
  console.log(
    `Residuals, ${label}: interpret without residuals ${i.toFixed(1)} ms, residuals ${m.toFixed(1)} ms (wall medians) = ${(m / i).toFixed(1)} × interpret; ${info}`,
  );
}


async function main(): Promise<void> {
  const cpu = cpus();
  console.log(`# Arcline bench, ${new Date().toISOString().slice(0, 10)}; ${cpu[0]?.model ?? 'unknown CPU'}, ${cpu.length} cores, ${arch()}, ${(totalmem() / 2 ** 30).toFixed(0)} GB, Node ${process.version}; load average ${loadavg()[0].toFixed(1)} at start`);
  console.log('');
  await engineTable();
  formerAgainstCurrent();
  console.log('');
  console.log('## Time-term inversion');
  timeTermBench();
  console.log('');
  console.log('## SEG-2 gathers');
  gatherBench();
  console.log('');
  console.log('## Forward model');
  forwardModel();
  console.log(`Machine load average (1 min): ${loadavg()[0].toFixed(1)} on ${cpus().length} cores at the end; wall times stretch when other jobs run.`);
}

await main();
