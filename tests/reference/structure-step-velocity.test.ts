/**
 * Structure under the line, end to end: synthetic lines from the eikonal forward model
 * (engine/forward/synthetic.ts, 0.25 m cells; first arrivals by Fermat's principle through
 * the model's geometry, not by the engine's formulas) fed through `interpret`.
 *
 * Lines (each generated once): a flat refractor (parallel-shift property and noise
 * robustness), a step fault, a lateral change of refractor velocity and a lateral change of
 * top-layer velocity. 48 geophones at 2 m (x = 0–94 m), seven shots: two off-end, two at
 * the ends (half a spacing out), three inside the spread.
 *
 * Sources named beside each check: plus-minus (Hagedoorn, Geophysical Prospecting 7,
 * 1959); delay time of a step Δt = Δz·cos(ic)/V1 (Kearey, Brooks & Hill, An Introduction
 * to Geophysical Exploration, 3rd ed., 2002, ch. 5); tolerances are those of the issue
 * "Structure under the line".
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import { layerVelocityAt, type LayeredModel } from '../../engine/forward/model.js';
import { CELL_M, LAYOUT, SEVEN_SHOTS, SPACING_M, V1, V2, level, report, run, trueDepthM } from './structure-lines.js';
import { seededUniform, standardNormal } from '../../engine/forward/seeded-random.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { Interpretation } from '../../engine/output/interpretation.js';

function depthErrors(model: LayeredModel, result: Interpretation, keep: (x: number) => boolean): { x: number; relative: number }[] {
  return result.stations
    .filter((s) => keep(s.x))
    .map((s) => ({ x: s.x, relative: s.depth === null ? Infinity : Math.abs(s.depth - trueDepthM(model, s.x)) / trueDepthM(model, s.x) }));
}


describe('flat refractor: parallel branches, and no structure read from pick noise', () => {
  const model: LayeredModel = { surface: level(0), layers: [{ velocity: V1 }, { velocity: V2, top: level(-6) }] };
  let exact: Survey;
  let result: Interpretation;
  beforeAll(() => {
    exact = syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M });
    result = run(exact);
  });

  it('off-end and end shot branches are parallel, shifted by a constant (common practice; Hagedoorn 1959)', () => {
    for (const [end, off] of [
      ['W-end', 'W-off'],
      ['E-end', 'E-off'],
    ]) {
      const endShot = result.shots.find((s) => s.id === end)!;
      const endTimes = exact.shots.find((s) => s.id === end)!.times;
      const offTimes = exact.shots.find((s) => s.id === off)!.times;
      // Where both record head waves, their difference is one number.
      const differences = endShot.branchOfPick
        .map((b, i) => (b === 1 && offTimes[i] !== null ? (offTimes[i] as number) - (endTimes[i] as number) : null))
        .filter((d): d is number => d !== null);
      expect(differences.length).toBeGreaterThan(20);
      const mean = differences.reduce((a, b) => a + b, 0) / differences.length;
      const worst = Math.max(...differences.map((d) => Math.abs(d - mean)));
      report('parallel shift', { end, off, shiftMs: +mean.toFixed(3), worstDeviationMs: +worst.toFixed(3), engine: endShot.phantom?.shiftMs });
      expect(worst).toBeLessThan(0.05);
      const phantom = endShot.phantom!;
      expect(phantom.fromShot).toBe(off);
      expect(Math.abs(phantom.shiftMs - mean)).toBeLessThan(0.02);
      expect(phantom.checks.find((c) => c.fromShot === off)?.parallel).toBe(true);
    }
    expect(result.qc.warnings.some((w) => w.code === 'phantom-not-parallel')).toBe(false);
  });

  it('noise-free: no step, no velocity change, one V1, planar dip 0°', () => {
    expect(result.features.steps).toEqual([]);
    expect(result.features.velocityChanges).toEqual([]);
    expect(result.refractorVelocity).toHaveLength(1);
    expect(new Set(result.stations.map((s) => s.v1)).size).toBe(1);
    expect(Math.abs(result.features.dip!.degrees)).toBeLessThan(0.5);
  });

  it('0.4 ms Gaussian pick noise (seeds 1–5): no step, no velocity change, no lateral V1', () => {
    const summary: unknown[] = [];
    for (let seed = 1; seed <= 5; seed++) {
      const uniform = seededUniform(seed);
      const noisy: Survey = {
        ...exact,
        shots: exact.shots.map((s) => ({ ...s, times: s.times.map((t) => (t === null ? null : Math.max(0, t + 0.4 * standardNormal(uniform)))) })),
      };
      const r = run(noisy, { pickUncertaintyMs: 0.4 });
      const worst = Math.max(...depthErrors(model, r, () => true).map((e) => e.relative));
      summary.push({ seed, steps: r.features.steps.length, changes: r.features.velocityChanges.length, v2: r.refractorVelocity.map((g) => g.velocity), worstDepthPct: +(100 * worst).toFixed(1) });
      expect(r.features.steps, `seed ${seed}`).toEqual([]);
      expect(r.features.velocityChanges, `seed ${seed}`).toEqual([]);
      expect(r.refractorVelocity, `seed ${seed}`).toHaveLength(1);
      expect(r.qc.warnings.some((w) => w.code === 'lateral-top-layer-velocity'), `seed ${seed}`).toBe(false);
    }
    report('noise 0.4 ms', { summary });
  });
});

describe('step fault: refractor 6 m deep stepping down 3 m at x = 47 m', () => {
  const STEP_X = 47;
  const THROW_M = 3;
  const model: LayeredModel = {
    surface: level(0),
    layers: [
      { velocity: V1 },
      {
        velocity: V2,
        top: [
          { x: -1000, elevation: -6 },
          { x: STEP_X, elevation: -6 },
          { x: STEP_X, elevation: -9 },
          { x: 1000, elevation: -9 },
        ],
      },
    ],
  };
  let survey: Survey;
  let result: Interpretation;
  beforeAll(() => {
    survey = syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M });
    result = run(survey);
  });

  it('finds one step within two geophone spacings, throw within 30 % and positive (deeper toward +x)', () => {
    const steps = result.features.steps;
    report('step', { steps });
    expect(steps).toHaveLength(1);
    expect(Math.abs(steps[0].x - STEP_X)).toBeLessThanOrEqual(2 * SPACING_M);
    expect(steps[0].throw).toBeGreaterThan(0);
    expect(Math.abs(steps[0].throw - THROW_M) / THROW_M).toBeLessThan(0.3);
    expect(steps[0].seenIn).toContain('delay-time');
  });

  it('reads it as a step, not as a dip or a velocity change', () => {
    expect(result.features.velocityChanges).toEqual([]);
    expect(result.refractorVelocity).toHaveLength(1);
    expect(Math.abs(result.refractorVelocity[0].velocity - V2) / V2).toBeLessThan(0.05);
    expect(result.features.dip).toBeNull();
  });

  it('gives depths within 5 % further from the step than the deeper depth (9 m)', () => {
    const errors = depthErrors(model, result, (x) => Math.abs(x - STEP_X) > 9);
    report('step depths', { worstPct: +(100 * Math.max(...errors.map((e) => e.relative))).toFixed(2), stations: errors.length });
    expect(errors.length).toBeGreaterThan(35);
    for (const e of errors) expect(e.relative, `x = ${e.x}`).toBeLessThan(0.05);
  });

  it('the off-end branch shows a vertical jump of about Δz·cos(ic)/V1 past the step (common practice; Kearey et al. 2002 ch. 5)', () => {
    const times = survey.shots.find((s) => s.id === 'W-off')!.times;
    const line = (from: number, to: number) => {
      const pts = survey.geophones.map((g, i) => [g.x, times[i] as number]).filter(([x]) => x >= from && x <= to);
      const n = pts.length;
      const mx = pts.reduce((a, p) => a + p[0], 0) / n;
      const mt = pts.reduce((a, p) => a + p[1], 0) / n;
      const slope = pts.reduce((a, p) => a + (p[0] - mx) * (p[1] - mt), 0) / pts.reduce((a, p) => a + (p[0] - mx) ** 2, 0);
      return { slope, at: (x: number) => mt + slope * (x - mx) };
    };
    const before = line(10, 40);
    const after = line(62, 94);
    const jumpMs = after.at(STEP_X) - before.at(STEP_X);
    const expected = ((THROW_M * Math.cos(Math.asin(V1 / V2))) / V1) * 1000;
    const engine = result.features.steps[0].branchJumps!.find((b) => b.shot === 'W-off');
    report('off-end jump', { measuredMs: +jumpMs.toFixed(2), expectedMs: +expected.toFixed(2), slopes: [before.slope, after.slope].map((s) => +s.toFixed(4)), engineMs: engine?.jumpMs });
    // Parallel pieces (same apparent velocity), offset in time.
    expect(Math.abs(after.slope - before.slope) / before.slope).toBeLessThan(0.02);
    expect(Math.abs(jumpMs - expected) / expected).toBeLessThan(0.15);
    expect(result.features.steps[0].seenIn).toContain('W-off');
    expect(Math.abs((engine?.jumpMs ?? Infinity) - jumpMs)).toBeLessThan(0.5);
  });
});

describe('lateral refractor-velocity change: 2200 → 3900 m/s at x = 47 m, refractor flat 6 m deep', () => {
  const CONTACT_X = 47;
  const model: LayeredModel = {
    surface: level(0),
    layers: [{ velocity: V1 }, { velocity: { contactsX: [CONTACT_X], velocities: [2200, 3900] }, top: level(-6) }],
  };
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M }));
  });

  it('finds one change within three spacings, both velocities within 5 %', () => {
    const changes = result.features.velocityChanges;
    report('velocity change', { changes, segments: result.refractorVelocity });
    expect(changes).toHaveLength(1);
    expect(Math.abs(changes[0].x - CONTACT_X)).toBeLessThanOrEqual(3 * SPACING_M);
    expect(Math.abs(changes[0].left - 2200) / 2200).toBeLessThan(0.05);
    expect(Math.abs(changes[0].right - 3900) / 3900).toBeLessThan(0.05);
    expect(result.refractorVelocity).toHaveLength(2);
    expect(result.features.steps).toEqual([]);
  });

  it("gives each station its segment's velocity and depths within 5 %", () => {
    for (const s of result.stations) {
      if (Math.abs(s.x - CONTACT_X) <= 3 * SPACING_M) continue;
      const truth = layerVelocityAt(model.layers[1].velocity, s.x);
      expect(Math.abs((s.refractorVelocity as number) - truth) / truth, `x = ${s.x}`).toBeLessThan(0.05);
    }
    const errors = depthErrors(model, result, () => true);
    report('velocity change depths', { worstPct: +(100 * Math.max(...errors.map((e) => e.relative))).toFixed(2) });
    for (const e of errors) expect(e.relative, `x = ${e.x}`).toBeLessThan(0.05);
  });
});

describe('lateral top-layer velocity: V1 500 m/s left of x = 47 m, 800 m/s right of it', () => {
  const CONTACT_X = 47;
  const model: LayeredModel = {
    surface: level(0),
    layers: [{ velocity: { contactsX: [CONTACT_X], velocities: [500, 800] } }, { velocity: V2, top: level(-6) }],
  };
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M }));
  });

  // Between the last direct picks on either side of the contact (here about x = 41–55 m)
  // V1 is interpolated, so the check stays more than 9 m (1.5 depths) from the contact.
  const away = (x: number) => Math.abs(x - CONTACT_X) > 9;

  it('gives the local V1 at the stations within 5 %', () => {
    expect(result.qc.warnings.some((w) => w.code === 'lateral-top-layer-velocity')).toBe(true);
    for (const s of result.stations.filter((q) => away(q.x))) {
      const truth = layerVelocityAt(model.layers[0].velocity, s.x);
      expect(Math.abs((s.v1 as number) - truth) / truth, `x = ${s.x}`).toBeLessThan(0.05);
    }
  });

  it('gives depths within 5 % with the local V1, and reads no step from the change of V1', () => {
    const errors = depthErrors(model, result, away);
    report('lateral V1 depths', { worstPct: +(100 * Math.max(...errors.map((e) => e.relative))).toFixed(2), stations: errors.length });
    expect(errors.length).toBeGreaterThan(35);
    for (const e of errors) expect(e.relative, `x = ${e.x}`).toBeLessThan(0.05);
    expect(result.features.steps).toEqual([]);
    expect(result.features.velocityChanges).toEqual([]);
  });
});
