/**
 * Benchmark of the forward model (npm run bench). Reports:
 * - solver speed in grid nodes per second per shot, on the production grid (0.25 m cells)
 *   over a 200 m × 40 m section (801 × 161 nodes), for second- and first-order stencils;
 * - the time to model a whole 48-geophone, 7-shot line (grid build + 7 solves + sampling).
 * Target (brief): under 50 ms per shot on the 2-core machine. Speed is never asserted in tests.
 */
import { cpus, loadavg } from 'node:os';
import { solveFirstArrivals } from '../engine/forward/eikonal.js';
import { buildVelocityGrid, type LayeredModel } from '../engine/forward/model.js';
import { syntheticSurvey } from '../engine/forward/synthetic.js';
import { interpret } from '../engine/pipeline/interpret.js';
import { withResiduals } from '../engine/qc/residuals.js';
import { demoLine } from '../engine/samples/demo-lines.js';
import type { Survey } from '../engine/survey/survey.js';

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

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

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

function main(): void {
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
  console.log(`Machine load average (1 min): ${loadavg()[0].toFixed(1)} on ${cpus().length} cores; wall times stretch when other jobs run.`);
  console.log('Target: under 50 ms per shot.');
}

/**
 * Cost of the residuals check (engine/residuals.ts) against the cost of interpret without
 * it, measured in the same run: median over repeats of interpret({residuals: false}) and of
 * withResiduals on that interpretation.
 */
function residualsCost(label: string, survey: Survey): void {
  const plainSurvey: Survey = { ...survey, options: { ...survey.options, residuals: false } };
  const base = interpret(plainSurvey);
  withResiduals(survey, base); // warm-up
  const interpretMs: number[] = [];
  const residualMs: number[] = [];
  let info = '';
  for (let r = 0; r < 7; r++) {
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

main();
