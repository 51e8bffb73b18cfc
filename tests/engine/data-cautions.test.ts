import { describe, expect, it } from 'vitest';
import { roundVelocity } from '../../engine/output/display-precision.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { dataCautions, MIN_PICKS_PER_BRANCH } from '../../engine/qc/data-cautions.js';
import { hiddenLayerAllowance, isLayerHidden } from '../../engine/structure/hidden-layer.js';
import { demoLine, flatLine, flatLineModel } from '../../engine/samples/demo-lines.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';

const GEOPHONES = Array.from({ length: 48 }, (_, i) => ({ x: 2 * i }));

function codes(r: Interpretation): string[] {
  return r.qc.warnings.map((w) => w.code);
}

/** No NaN or ±Infinity anywhere: JSON would turn them into null and the round trip would differ. */
function expectFinite(r: Interpretation): void {
  expect(JSON.parse(JSON.stringify(r))).toEqual(r);
}

describe('hidden layer / blind zone (Soske 1959; Kearey, Brooks & Hill 2002 ch. 5; ASTM D5777)', () => {
  it('on the demo line names a positive thickness and the line\'s own velocities; far thinner layers hide on its offsets, far thicker ones show', () => {
    const r = interpret(demoLine());
    const hidden = r.qc.warnings.filter((w) => w.code === 'hidden-layer');
    expect(hidden).toHaveLength(1);
    // Numbers as the page shows them (engine/output/display-precision.js): velocities to 10 m/s, grouped "2,800".
    const m = /up to ([\d.]+) m with a velocity between ([\d,]+) and ([\d,]+) m\/s \(checked at ([\d,]+) m\/s\)/.exec(hidden[0].message);
    expect(m).not.toBeNull();
    const shown = (text: string): number => Number(text.replace(/,/g, ''));
    const [h, v2] = [Number(m![1]), shown(m![4])];
    expect(h).toBeGreaterThan(0);
    expect(shown(m![2])).toBe(roundVelocity(r.layers[0].velocity));
    expect(shown(m![3])).toBe(roundVelocity(r.layers[1].velocity));
    const [v1, v3] = [r.layers[0].velocity, r.layers[1].velocity];
    // Sanity of the bound on the same offsets and velocities (under a 0.5 m top layer).
    const survey = demoLine();
    const offsetsM = survey.geophones.map((g) => Math.abs(g.x - survey.shots[0].x));
    const hiddenAt = (t: number): boolean => isLayerHidden({ v1MPerS: v1, topThicknessM: 0.5, hiddenVelocityMPerS: v2, refractorVelocityMPerS: v3, offsetsM, hiddenThicknessM: t });
    expect(hiddenAt(0.1)).toBe(true);
    expect(hiddenAt(20 * h)).toBe(false);
    expectFinite(r);
  });
});

describe('hidden layer on the section: the deepest refractor it allows under each station', () => {
  it('on the demo line, every station with a depth gets a deeper limit; at the median depth it is the warning\'s own extra depth', () => {
    const survey = demoLine();
    const r = interpret(survey);
    const withDepth = r.stations.filter((s) => typeof s.depth === 'number' && s.depth > 0);
    expect(withDepth.length).toBeGreaterThan(0);
    for (const s of withDepth) expect(s.hiddenLayerDepth as number).toBeGreaterThan(s.depth as number);
    const m = /up to ([\d.]+) m deeper than shown/.exec(r.qc.warnings.find((w) => w.code === 'hidden-layer')!.message)!;
    // The same allowance, computed directly on every shot side at the median depth.
    const depths = withDepth.map((s) => s.depth as number).sort((a, b) => a - b);
    const medianDepth = depths.length % 2 ? depths[depths.length >> 1] : 0.5 * (depths[depths.length / 2 - 1] + depths[depths.length / 2]);
    const spreadsM = survey.shots.flatMap((shot) => [
      survey.geophones.filter((g, i) => typeof shot.times[i] === 'number' && g.x < shot.x).map((g) => shot.x - g.x),
      survey.geophones.filter((g, i) => typeof shot.times[i] === 'number' && g.x > shot.x).map((g) => g.x - shot.x),
    ]).filter((o) => o.length > 0);
    const a = hiddenLayerAllowance({ v1MPerS: r.layers[0].velocity, refractorVelocityMPerS: r.layers[1].velocity, depthM: medianDepth, spreadsM })!;
    expect(a.extraDepthM).toBeCloseTo(Number(m[1]), 1);
    expectFinite(r);
  });
});

describe('velocity inversion (ASTM D5777; USACE EM 1110-1-1802)', () => {
  // Invented, unphysical picks (as from a mis-picked record): 500 m/s direct, 2000 m/s
  // refracted to 40 m offset, then slower (1500 m/s) beyond; the user splits branch 2 at 40 m.
  const timeMs = (o: number): number => Math.min((1000 * o) / 500, o <= 40 ? 10 + (1000 * o) / 2000 : 30 + (1000 * (o - 40)) / 1500);
  const picksWithin40 = (x: number): number => GEOPHONES.filter((g) => g.x !== x && Math.abs(g.x - x) <= 40).length;
  const direct = (x: number): number => GEOPHONES.filter((g) => g.x !== x && (1000 * Math.abs(g.x - x)) / 500 <= 10 + (1000 * Math.abs(g.x - x)) / 2000).length;
  const survey: Survey = {
    geophones: GEOPHONES,
    shots: [
      { id: 'W-end', x: -1, times: GEOPHONES.map((g) => timeMs(g.x + 1)) },
      { id: 'E-end', x: 95, times: GEOPHONES.map((g) => timeMs(95 - g.x)) },
    ],
    options: {
      layers: 3,
      branchOverrides: [
        { shot: 'W-end', side: 'right', directPicks: direct(-1), firstRefractorPicks: picksWithin40(-1) },
        { shot: 'E-end', side: 'left', directPicks: direct(95), firstRefractorPicks: picksWithin40(95) },
      ],
    },
  };
  const r = interpret(survey);

  it('warns on each shot side whose later branch is slower, and on the layer velocities', () => {
    const inversions = r.qc.warnings.filter((w) => w.code === 'velocity-inversion');
    expect(inversions.filter((w) => w.x === -1)).toHaveLength(1);
    expect(inversions.filter((w) => w.x === 95)).toHaveLength(1);
    expect(inversions.some((w) => w.x === undefined && /second refractor's velocity/.test(w.message))).toBe(true);
  });

  it('gives no depth to a "second refractor" slower than the first', () => {
    for (const s of r.stations) expect(s.depths[1] ?? null).toBeNull();
    expect(r.layers.length).toBeLessThanOrEqual(2);
    expectFinite(r);
  });
});

describe('too few refracted picks', () => {
  it(`warns for a shot side with fewer than ${MIN_PICKS_PER_BRANCH} refracted picks, naming it`, () => {
    const line = flatLine();
    const mid = line.shots.find((s) => s.id === 'mid')!;
    const leftPicks = line.geophones.filter((g) => g.x < mid.x).length;
    const r = interpret({ ...line, options: { branchOverrides: [{ shot: 'mid', side: 'left', directPicks: leftPicks - 2 }] } });
    const few = r.qc.warnings.filter((w) => w.code === 'few-refracted-picks-side');
    expect(few).toHaveLength(1);
    expect(few[0].x).toBe(mid.x);
    expect(few[0].message).toMatch(/left side of mid has only 2 on the first refractor/);
    expectFinite(r);
  });

  it('warns once for the whole line when it has too few refracted picks, however many steps notice', () => {
    const geophones = [{ x: 0 }, { x: 5 }, { x: 10 }];
    const model = flatLineModel().refractor;
    const slow = (o: number): number => (1000 * o) / model.v1;
    const r = interpret({
      geophones,
      shots: [
        { id: 'A', x: -1, times: geophones.map((g) => slow(g.x + 1)) },
        { id: 'B', x: 11, times: geophones.map((g) => slow(11 - g.x)) },
      ],
    });
    expect(codes(r).filter((c) => c === 'few-refracted-picks')).toHaveLength(1);
    expectFinite(r);
  });

  it('the demo line has enough picks everywhere: no such warning', () => {
    const c = codes(interpret(demoLine()));
    expect(c).not.toContain('few-refracted-picks');
    expect(c).not.toContain('few-refracted-picks-side');
  });
});

describe('V2 not above V1', () => {
  it('is said once when the minus times give a refractor no faster than the top layer', () => {
    // One velocity everywhere (no refractor) and the user calls the far picks refracted.
    const slow = (o: number): number => (1000 * o) / 600;
    const survey: Survey = {
      geophones: GEOPHONES,
      shots: [
        { id: 'W-end', x: -1, times: GEOPHONES.map((g) => slow(g.x + 1)) },
        { id: 'E-end', x: 95, times: GEOPHONES.map((g) => slow(95 - g.x)) },
      ],
      options: { branchOverrides: [{ shot: 'W-end', side: 'right', directPicks: 6 }, { shot: 'E-end', side: 'left', directPicks: 6 }] },
    };
    const r = interpret(survey);
    expect(codes(r).filter((c) => c === 'v2-not-above-v1')).toHaveLength(1);
    for (const s of r.stations) expect(s.depth).toBeNull();
    expectFinite(r);
  });

  it('is added for stations whose own refractor velocity is not above their V1, unless the line already says it', () => {
    const r = interpret(flatLine());
    expect(codes(r)).not.toContain('v2-not-above-v1');
    const tampered: Interpretation = { ...r, stations: r.stations.map((s, i) => (i === 5 ? { ...s, refractorVelocity: (s.v1 as number) - 10 } : s)) };
    const added = dataCautions(flatLine(), tampered).filter((w) => w.code === 'v2-not-above-v1');
    expect(added).toHaveLength(1);
    expect(added[0].x).toBe(r.stations[5].x);
    const already: Interpretation = { ...tampered, qc: { ...tampered.qc, warnings: [...tampered.qc.warnings, { code: 'v2-not-above-v1', message: 'from the minus times' }] } };
    expect(dataCautions(flatLine(), already).filter((w) => w.code === 'v2-not-above-v1')).toHaveLength(0);
  });
});
