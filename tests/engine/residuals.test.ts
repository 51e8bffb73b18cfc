// Residuals: first arrivals modelled through an interpreted section (engine/residuals.ts)
// and the section as a model (engine/forward/interpretation-model.ts).
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { computeResiduals, withResiduals, RESIDUALS_HIGH_FACTOR } from '../../engine/qc/residuals.js';
import { modelFromInterpretation, residualGridExtent, RESIDUAL_MAX_CELL_M } from '../../engine/forward/interpretation-model.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import { flatLine, flatLineModel } from '../../engine/samples/demo-lines.js';
import { firstArrivalMs } from '../../engine/forward/planar-refractor.js';

const flat = flatLine();
const flatResult = interpret(flat);

describe('withResiduals through interpret', () => {
  it('models every geophone of every shot within 0.5 % of the closed-form first arrival (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    const model = flatLineModel();
    for (const shot of flatResult.shots) {
      expect(shot.modelledMs).toHaveLength(flat.geophones.length);
      shot.modelledMs!.forEach((t, i) => {
        const g = flat.geophones[i];
        const exact = firstArrivalMs(model.refractor, { x: shot.x, elevation: shot.elevation }, { x: g.x, elevation: g.elevation ?? 0 });
        expect(t).not.toBeNull();
        if (exact === 0) expect(t).toBe(0);
        else expect(Math.abs((t as number) - exact) / exact).toBeLessThan(0.005);
      });
    }
  });

  it('gives qc.residuals in the contract shape, one entry per shot, near the 0.1 ms rounding of the picks', () => {
    const r = flatResult.qc.residuals!;
    expect(r.perShot.map((p) => p.shot)).toEqual(flat.shots.map((s) => s.id));
    // Picks rounded to 0.1 ms scatter by 0.1/√12 ≈ 0.03 ms about the exact times.
    expect(r.rmsMs).toBeLessThan(0.1);
    // Each shot's RMS is that of its own residuals (rounded to 0.01 ms, so within 0.01 ms).
    for (const p of r.perShot) {
      const shot = flatResult.shots.find((s) => s.id === p.shot) as (typeof flatResult.shots)[number] & { residualMs: (number | null)[] };
      const own = shot.residualMs.filter((v): v is number => v !== null);
      expect(Math.abs(p.rmsMs - Math.sqrt(own.reduce((sum, v) => sum + v * v, 0) / own.length))).toBeLessThanOrEqual(0.01);
    }
    expect(flatResult.qc.warnings.map((w) => w.code)).not.toContain('residuals-high');
  });

  it('reports residual = pick − modelled, and leaves out the pick at the shot itself', () => {
    for (const [k, shot] of flatResult.shots.entries()) {
      const residualMs = shot.residualMs!;
      flat.shots[k].times.forEach((pick, i) => {
        const atShot = flat.geophones[i].x === shot.x;
        if (pick === null || atShot) expect(residualMs[i]).toBeNull();
        else expect(residualMs[i]).toBeCloseTo(pick - (shot.modelledMs![i] as number), 1);
      });
    }
    // W-end sits on geophone 0 of 24: 23 residuals; W-off is off the spread: 24.
    const count = (id: string) => flatResult.qc.residuals!.perShot.find((p) => p.shot === id)!.count;
    expect(count('W-end')).toBe(23);
    expect(count('W-off')).toBe(24);
  });

  it('skips the check when options.residuals is false: no qc.residuals, no modelledMs', () => {
    const r = interpret({ ...flat, options: { residuals: false } });
    expect(r.qc.residuals).toBeUndefined();
    for (const s of r.shots) expect(s.modelledMs).toBeUndefined();
    expect(r.stations).toEqual(flatResult.stations);
  });
});

describe('a shot recorded on part of the line (a rolling spread)', () => {
  it('models the stretch it was recorded on, with the same times as when every geophone recorded it, and gives null beyond', () => {
    // Shot 0 keeps its picks on the first half of the spread only (the rest dead): a shot of
    // a rolling line. The interpretation is the same; only what is modelled differs.
    const shot = flat.shots[0];
    const half = Math.floor(flat.geophones.length / 2);
    const partial: Survey = { ...flat, shots: flat.shots.map((s, k) => (k === 0 ? { ...s, times: s.times.map((t, i) => (i < half ? t : null)) } : s)) };
    const full = computeResiduals(flat, flatResult);
    const part = computeResiduals(partial, flatResult);
    expect(full.ok && part.ok).toBe(true);
    if (!full.ok || !part.ok) return;
    const lastPicked = Math.max(...shot.times.slice(0, half).map((t, i) => (t === null ? -1 : i)));
    part.shots[0].modelledMs.forEach((t, i) => {
      // Inside the recorded stretch the march has accepted these nodes, so their times are final and equal.
      if (i <= lastPicked) expect(t).toBe(full.shots[0].modelledMs[i]);
      else expect(t).toBeNull();
    });
    // The other shots are untouched.
    expect(part.shots[1].modelledMs).toEqual(full.shots[1].modelledMs);
  });
});

describe('residual warnings', () => {
  it('warns "residuals-high" naming the worst shots when the section is 2 m too deep', () => {
    const plain = interpret({ ...flat, options: { residuals: false } });
    const tooDeep: Interpretation = {
      ...plain,
      stations: plain.stations.map((s) => ({ ...s, depth: s.depth! + 2, refractorElevation: s.refractorElevation! - 2 })),
    };
    const r = withResiduals(flat, tooDeep);
    // 2 m deeper adds 2·2 m·cos(ic)/V1 ≈ 7 ms to every head-wave time.
    expect(r.qc.residuals!.rmsMs).toBeGreaterThan(RESIDUALS_HIGH_FACTOR * 0.5);
    const w = r.qc.warnings.find((x) => x.code === 'residuals-high');
    expect(w).toBeDefined();
    expect(w!.message).toMatch(/W-off|E-off/);
    // The input is not mutated.
    expect(tooDeep.qc.residuals).toBeUndefined();
    expect(tooDeep.shots[0].modelledMs).toBeUndefined();
  });

  it('uses options.pickUncertaintyMs for the limit', () => {
    const strict = interpret({ ...flat, options: { pickUncertaintyMs: 0.005 } });
    expect(strict.qc.residuals!.rmsMs).toBeGreaterThan(RESIDUALS_HIGH_FACTOR * 0.005);
    expect(strict.qc.warnings.map((w) => w.code)).toContain('residuals-high');
  });

  it('never throws on an interpretation without depths: "residuals-not-computed"', () => {
    const plain = interpret({ ...flat, options: { residuals: false } });
    const noDepths: Interpretation = {
      ...plain,
      stations: plain.stations.map((s) => ({ ...s, depth: null, refractorElevation: null, depths: [null] })),
    };
    const r = withResiduals(flat, noDepths);
    expect(r.qc.residuals).toBeUndefined();
    expect(r.qc.warnings.find((w) => w.code === 'residuals-not-computed')?.message).toMatch(/no station has a depth/);
    const noLayers = withResiduals(flat, { ...plain, layers: [] });
    expect(noLayers.qc.warnings.map((w) => w.code)).toContain('residuals-not-computed');
  });

  it('never throws on absurd numbers (NaN depth, velocity out of range)', () => {
    const plain = interpret({ ...flat, options: { residuals: false } });
    const odd: Interpretation = {
      ...plain,
      layers: [{ velocity: 5 }, { velocity: 1e9 }],
      stations: plain.stations.map((s, i) => ({ ...s, depth: i === 3 ? Number.NaN : s.depth })),
    };
    expect(() => withResiduals(flat, odd)).not.toThrow();
    expect(computeResiduals(flat, odd).ok).toBe(false);
  });
});

describe('modelFromInterpretation', () => {
  const plain = interpret({ ...flat, options: { residuals: false } });

  it('interpolates a gap linearly and continues flat beyond the outermost depth when no dip is reported', () => {
    const gapped: Interpretation = {
      ...plain,
      features: { ...plain.features, dip: null },
      stations: plain.stations.map((s, i) => {
        const depth = i === 0 || i === 1 || i === 10 ? null : i === 9 ? 5 : i === 11 ? 7 : s.depth;
        return { ...s, depth, depths: [depth] };
      }),
    };
    const built = modelFromInterpretation(flat, gapped);
    expect(built.ok).toBe(true);
    if (!built.ok) return;
    const top = built.model.layers[1].top!;
    const ground = 50;
    expect(elevationAt(top, flat.geophones[10].x)).toBeCloseTo(ground - 6, 6); // halfway between 5 m and 7 m
    expect(built.interpolatedX).toEqual([flat.geophones[10].x]);
    expect(built.extrapolatedX).toEqual([flat.geophones[0].x, flat.geophones[1].x]);
    expect(built.model.layers[0].velocity).toBe(plain.layers[0].velocity);
    expect(built.model.layers[1].velocity).toBe(plain.layers[1].velocity);
  });

  it('places the refractor under an off-end shot from its delay time (6 m under Demo B)', () => {
    const built = modelFromInterpretation(flat, plain);
    if (!built.ok) throw new Error(built.reason);
    const west = built.shotAnchors.find((a) => a.shot === 'W-off')!;
    expect(west.count).toBeGreaterThanOrEqual(3);
    expect(west.refractorElevation).toBeCloseTo(44, 0);
  });

  it('adds a second refractor from depths[1] and a third velocity', () => {
    const three: Interpretation = {
      ...plain,
      layers: [...plain.layers, { velocity: 4000 }],
      stations: plain.stations.map((s) => ({ ...s, depths: [s.depth, 15] })),
    };
    const built = modelFromInterpretation(flat, three);
    if (!built.ok) throw new Error(built.reason);
    expect(built.refractorCount).toBe(2);
    expect(elevationAt(built.model.layers[2].top!, 20)).toBeCloseTo(35, 6);
    expect(built.model.layers[2].velocity).toBe(4000);
  });

  it('turns refractor velocity segments into lateral contacts halfway between them', () => {
    const lateral: Interpretation = {
      ...plain,
      refractorVelocity: [
        { from: 0, to: 20, velocity: 2000 },
        { from: 24, to: 46, velocity: 3000 },
      ],
    };
    const built = modelFromInterpretation(flat, lateral);
    if (!built.ok) throw new Error(built.reason);
    expect(built.model.layers[1].velocity).toEqual({ contactsX: [22], velocities: [2000, 3000] });
  });

  it('chooses a cell of a whole fraction of the spacing (2 m / 4 over a 6 m layer), and reaches past the off-end shots', () => {
    const built = modelFromInterpretation(flat, plain);
    if (!built.ok) throw new Error(built.reason);
    const { extent } = residualGridExtent(built, flat);
    expect(extent.cellM).toBeLessThanOrEqual(RESIDUAL_MAX_CELL_M);
    expect(extent.cellM).toBeCloseTo(2 / 4, 6);
    expect(extent.xMin).toBeLessThan(-20);
    expect(extent.xMax).toBeGreaterThan(66);
  });
});

describe('the cell follows the thinnest layer under the geophones', () => {
  it('takes more cells per spacing over a thin layer (2 m spacing, 1.5 m layer: 2 m / ⌈8·2/1.5⌉ = 2 m / 11)', () => {
    const built = modelFromInterpretation(flat, interpret({ ...flat, options: { residuals: false } }));
    if (!built.ok) throw new Error(built.reason);
    // The same model with its refractor raised to 1.5 m under the ground everywhere.
    const surface = built.model.surface;
    const thin = { ...built, model: { ...built.model, layers: built.model.layers.map((l, k) => (k === 1 ? { ...l, top: surface.map((p) => ({ x: p.x, elevation: p.elevation - 1.5 })) } : l)) } };
    expect(residualGridExtent(thin, flat).extent.cellM).toBeCloseTo(2 / 11, 6);
  });
});

describe('a long line (480 geophones, 3 m spacing, 8 m to the refractor, closed-form picks)', () => {
  it('keeps the noise-free residual RMS under 0.1 ms with the cell the rule gives (3 m / 5 = 0.6 m)', () => {
    const model = { v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 0 };
    const xs = Array.from({ length: 480 }, (_, i) => 3 * i);
    const last = xs[xs.length - 1];
    const shotXs = [-30, -1.5, 718.5, last + 1.5, last + 30];
    const survey: Survey = {
      name: 'long flat line',
      geophones: xs.map((x) => ({ x, elevation: 100 })),
      shots: shotXs.map((sx, k) => ({
        id: `L${k + 1}`,
        x: sx,
        elevation: 100,
        times: xs.map((x) => Math.round(firstArrivalMs(model, { x: sx, elevation: 100 }, { x, elevation: 100 }) * 10) / 10),
      })),
    };
    const r = interpret(survey).qc.residuals as unknown as { cellM: number; rmsMs: number };
    expect(r.cellM).toBeCloseTo(0.6, 6);
    // Picks rounded to 0.1 ms scatter by about 0.03 ms about the exact times.
    expect(r.rmsMs).toBeLessThan(0.1);
  }, 60_000);
});

describe('odd surveys', () => {
  it('models a shot without an elevation on the ground the geophones give', () => {
    const survey: Survey = { ...flat, shots: flat.shots.map((s) => ({ id: s.id, x: s.x, times: s.times })) };
    const r = interpret(survey);
    expect(r.qc.residuals!.rmsMs).toBeLessThan(0.1);
  });
});
