/**
 * Issue 10 acceptance: three-layer lines (soil over weathered rock over fresh rock).
 *
 * Part 1 checks the branch lines the engine fits on an eikonal line against the published
 * closed forms for three flat layers (each check names its source):
 *   - intercept time of the head wave along the top of layer n,
 *       t_i,n = Σ_{i<n} 2·h_i·cos θ_in / V_i,  sin θ_in = V_i/V_n
 *     (Kearey, Brooks & Hill, An Introduction to Geophysical Exploration, 3rd ed., 2002,
 *     ch. 5, eq. for the multi-layer case; Telford, Geldart & Sheriff, Applied Geophysics,
 *     2nd ed., 1990, ch. 4);
 *   - crossover distance direct → first refractor, x_c = 2·h1·√((V2 + V1)/(V2 − V1))
 *     (Kearey et al. 2002, ch. 5);
 *   - crossover distance first → second refractor, where the two head-wave lines meet:
 *       x_c,23 = (t_i,3 − t_i,2) / (1/V2 − 1/V3)
 *     (Telford et al. 1990, ch. 4: the crossover of two straight branches).
 * Part 2 is a family of invented three-layer models forward-modelled with the project's
 * eikonal solver (engine/forward/synthetic.ts, 0.25 m cells); each case names its model.
 * Acceptance (issue 10): every layer velocity within 3 %, the median depth ratio
 * (interpreted / true, over stations with a depth) of both refractors within 5 %, with and
 * without options.layers = 3. Measured numbers are in docs/developers/three-layer.md.
 */
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';

/** An invented three-layer model: velocities V1 < V2 < V3, depth to each refractor at x = 0, rock dip. */
interface ThreeLayerCase {
  name: string;
  v: [number, number, number];
  /** Depth to the first refractor (flat), m. */
  z1: number;
  /** Depth to the second refractor at x = 0, m. */
  z2: number;
  /** Dip of the second refractor, degrees, positive deepening toward +x. */
  dipDeg: number;
  geophones: number;
  spacingM: number;
  /** Distance of the off-end shots beyond the end geophones, m. */
  offEndM: number;
}

const FAR = 500;

function modelOf(c: ThreeLayerCase): LayeredModel {
  const slope = Math.tan((c.dipDeg * Math.PI) / 180);
  return {
    surface: [{ x: -FAR, elevation: 0 }, { x: FAR, elevation: 0 }],
    layers: [
      { velocity: c.v[0] },
      { velocity: c.v[1], top: [{ x: -FAR, elevation: -c.z1 }, { x: FAR, elevation: -c.z1 }] },
      { velocity: c.v[2], top: [{ x: -FAR, elevation: -c.z2 + FAR * slope }, { x: FAR, elevation: -c.z2 - FAR * slope }] },
    ],
  };
}

function lineOf(c: ThreeLayerCase): Survey {
  const L = (c.geophones - 1) * c.spacingM;
  const half = c.spacingM / 2;
  return syntheticSurvey(modelOf(c), {
    geophoneCount: c.geophones,
    firstX: 0,
    spacing: c.spacingM,
    shots: [
      { x: -c.offEndM, id: 'W-off' },
      { x: -half, id: 'W-end' },
      { x: L / 2, id: 'mid' },
      { x: L + half, id: 'E-end' },
      { x: L + c.offEndM, id: 'E-off' },
    ],
    name: c.name,
  });
}

function trueDepths(c: ThreeLayerCase, x: number): [number, number] {
  return [c.z1, c.z2 + x * Math.tan((c.dipDeg * Math.PI) / 180)];
}

function medianOf(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Velocity errors and median depth ratios of an interpretation against its model. */
export function accuracy(c: ThreeLayerCase, r: Interpretation): { velocityErrors: number[]; depthRatio: [number | null, number | null] } {
  const velocityErrors = c.v.map((v, i) => (r.layers[i] ? r.layers[i].velocity / v - 1 : Number.POSITIVE_INFINITY));
  const ratios: [number[], number[]] = [[], []];
  for (const s of r.stations) {
    const truth = trueDepths(c, s.x);
    s.depths.forEach((d, k) => {
      if (k < 2 && typeof d === 'number') ratios[k].push(d / truth[k]);
    });
  }
  return { velocityErrors, depthRatio: [ratios[0].length ? medianOf(ratios[0]) : null, ratios[1].length ? medianOf(ratios[1]) : null] };
}

function expectAccepted(c: ThreeLayerCase, r: Interpretation): void {
  expect(r.layers, `${c.name}: layer count`).toHaveLength(3);
  const a = accuracy(c, r);
  a.velocityErrors.forEach((e, i) => expect(Math.abs(e), `${c.name}: V${i + 1} = ${r.layers[i]?.velocity}`).toBeLessThan(0.03));
  a.depthRatio.forEach((q, k) => {
    expect(q, `${c.name}: refractor ${k + 1} has depths`).not.toBeNull();
    expect(Math.abs((q as number) - 1), `${c.name}: median depth ratio of refractor ${k + 1}`).toBeLessThan(0.05);
  });
}

/** The issue's line: soil ~400 m/s, weathered rock ~1600 m/s at 4 m, rock ~3400 m/s at 15 m; 48 geophones at 1.5 m; off-end shots 45 m out. */
const ISSUE_LINE: ThreeLayerCase = { name: 'issue line 400/1600/3400, 4 and 15 m, 48 x 1.5 m, off-end 45 m', v: [400, 1600, 3400], z1: 4, z2: 15, dipDeg: 0, geophones: 48, spacingM: 1.5, offEndM: 45 };

/** The family: the issue line and three variations of it. */
const FAMILY: ThreeLayerCase[] = [
  ISSUE_LINE,
  { name: 'rock dipping 4°, off-end 15 m: 400/1600/3400, 4 m, 12 m at x = 0', v: [400, 1600, 3400], z1: 4, z2: 12, dipDeg: 4, geophones: 48, spacingM: 1.5, offEndM: 15 },
  { name: 'thin soil, strong contrasts: 600/1800/4500, 3 and 10 m, 48 x 2 m, off-end 30 m', v: [600, 1800, 4500], z1: 3, z2: 10, dipDeg: 0, geophones: 48, spacingM: 2, offEndM: 30 },
  { name: 'coarse spacing: 500/2000/4000, 5 and 14 m, 32 x 3 m, off-end 40 m', v: [500, 2000, 4000], z1: 5, z2: 14, dipDeg: 0, geophones: 32, spacingM: 3, offEndM: 40 },
];

describe('three flat layers on an eikonal line: branch lines against the closed forms', () => {
  const c = ISSUE_LINE;
  const r = interpret({ ...lineOf(c), options: { layers: 3, residuals: false } });
  const [v1, v2, v3] = c.v;
  const h1 = c.z1;
  const h2 = c.z2 - c.z1;
  const cos = (a: number, b: number): number => Math.cos(Math.asin(a / b));
  // Kearey, Brooks & Hill 2002, ch. 5 (multi-layer intercept times); Telford et al. 1990, ch. 4.
  const ti2 = (1000 * 2 * h1 * cos(v1, v2)) / v1;
  const ti3 = 1000 * ((2 * h1 * cos(v1, v3)) / v1 + (2 * h2 * cos(v2, v3)) / v2);
  const wEnd = r.shots.find((s) => s.id === 'W-end')!.right!;
  const eEnd = r.shots.find((s) => s.id === 'E-end')!.left!;

  it('intercept time of the first refractor, t_i2 = 2·h1·cos θ12/V1 (Kearey et al. 2002, ch. 5), within 2 %', () => {
    for (const side of [wEnd, eEnd]) expect(Math.abs(side.refracted[0].interceptMs / ti2 - 1)).toBeLessThan(0.02);
  });

  it('intercept time of the second refractor, t_i3 = 2·h1·cos θ13/V1 + 2·h2·cos θ23/V2 (Kearey et al. 2002, ch. 5), within 2 %', () => {
    for (const side of [wEnd, eEnd]) expect(Math.abs(side.refracted[1].interceptMs / ti3 - 1)).toBeLessThan(0.02);
  });

  it('crossover distance direct → first refractor, x_c = 2·h1·√((V2 + V1)/(V2 − V1)) (Kearey et al. 2002, ch. 5), within 5 %', () => {
    const xc = 2 * h1 * Math.sqrt((v2 + v1) / (v2 - v1));
    for (const side of [wEnd, eEnd]) expect(Math.abs((side.crossoverDistance as number) / xc - 1)).toBeLessThan(0.05);
  });

  it('crossover distance first → second refractor, (t_i3 − t_i2)/(1/V2 − 1/V3) (Telford et al. 1990, ch. 4), within 5 %', () => {
    const xc23 = (ti3 - ti2) / (1000 / v2 - 1000 / v3);
    for (const side of [wEnd, eEnd]) {
      const [a, b] = side.refracted;
      const fitted = (b.interceptMs - a.interceptMs) / (1000 / a.velocity! - 1000 / b.velocity!);
      expect(Math.abs(fitted / xc23 - 1)).toBeLessThan(0.05);
    }
  });
});

describe('issue 10 acceptance: generated three-layer lines, velocities within 3 %, median depths within 5 %', () => {
  for (const c of FAMILY) {
    const survey = lineOf(c);
    it(`${c.name}, three layers asked for`, () => {
      expectAccepted(c, interpret({ ...survey, options: { layers: 3, residuals: false } }));
    });
    it(`${c.name}, layer count chosen by the picks`, () => {
      expectAccepted(c, interpret(survey));
    });
  }
});

/**
 * The issue line's branches read jointly (engine/branches/assign-branches.ts, issue 10 item 1):
 * the mid shot's corner segment (direct and first-refractor picks, ≈1020 m/s) is not a layer,
 * and the far off-end shots, whose branch runs parallel to the end shots' branch 2, reverse
 * the rock where the end shots' own branch-2 picks do not overlap.
 */
describe('the issue line: branches read against the whole line', () => {
  const survey = lineOf(ISSUE_LINE);
  it('three layers asked for: the mid shot shows the direct wave and the first refractor only, no second-refractor pick', () => {
    const r = interpret({ ...survey, options: { layers: 3, residuals: false } });
    const mid = r.shots.find((s) => s.id === 'mid')!;
    expect(mid.branchOfPick).not.toContain(2);
    for (const side of [mid.left!, mid.right!]) {
      expect(side.refracted).toHaveLength(1);
      expect(Math.abs(side.refracted[0].velocity! / ISSUE_LINE.v[1] - 1)).toBeLessThan(0.03);
    }
  });
  it('without the hint and without residuals (so no layer choice), the branch assignment alone finds the reversed rock', () => {
    const r = interpret({ ...survey, options: { residuals: false } });
    expect(r.qc.layerChoice).toBeUndefined();
    expect(r.layers).toHaveLength(3);
    expect(r.shots.some((s) => s.left?.deeperBranchUnreversed || s.right?.deeperBranchUnreversed)).toBe(false);
    expectAccepted(ISSUE_LINE, r);
  });
});

/**
 * Issue 10 item 3: the second refractor placed by an envelope of arcs about the first
 * refractor's arc feet (engine/depth/second-refractor.ts; Hagedoorn, Geophysical
 * Prospecting 7, 1959), not hung parallel to the ground. Model: soil 400 m/s over a flat
 * weathered layer 1600 m/s at 4 m over rock 3400 m/s at 12 m under x = 0, dipping 12°
 * toward +x; 48 geophones at 1.5 m, off-end shots 15 m out. Measured: with the envelope
 * every station's rock depth is within 1.0 % of the model (largest error 0.19 m); hung
 * parallel to the ground (the stage before) it was off by up to 2.6 % (0.68 m), too shallow
 * down-dip.
 */
describe('second refractor under a dipping rock surface: every station within 2 % of the model', () => {
  const c: ThreeLayerCase = { name: 'rock dipping 12°: 400/1600/3400, 4 m, 12 m at x = 0', v: [400, 1600, 3400], z1: 4, z2: 12, dipDeg: 12, geophones: 48, spacingM: 1.5, offEndM: 15 };
  it(c.name, () => {
    const r = interpret({ ...lineOf(c), options: { layers: 3, residuals: false } });
    const withDepth = r.stations.filter((s) => typeof s.depths[1] === 'number');
    expect(withDepth.length).toBe(c.geophones);
    for (const s of withDepth) {
      const truth = trueDepths(c, s.x)[1];
      expect(Math.abs((s.depths[1] as number) / truth - 1), `x = ${s.x}: ${s.depths[1]} m against ${truth.toFixed(2)} m`).toBeLessThan(0.02);
    }
  });
});

/**
 * The dip of the second refractor (engine/structure/lower-refractor.ts), tested as the first
 * refractor's: the χ²-accepted plane through the rock elevations. Against each model's own
 * dip (the family above, flat and 4°, and the 12° line): within 0.5°.
 */
describe('second-refractor dip against the model', () => {
  const cases: ThreeLayerCase[] = [
    ...FAMILY,
    { name: 'rock dipping 12°: 400/1600/3400, 4 m, 12 m at x = 0', v: [400, 1600, 3400], z1: 4, z2: 12, dipDeg: 12, geophones: 48, spacingM: 1.5, offEndM: 15 },
  ];
  for (const c of cases) {
    it(`${c.name}: dip ${c.dipDeg}° within 0.5°`, () => {
      const r = interpret({ ...lineOf(c), options: { layers: 3, residuals: false } });
      const dip = r.features.lowerRefractor?.dip;
      expect(dip, 'a single planar dip of the second refractor').toBeTruthy();
      expect(Math.abs(dip!.degrees - c.dipDeg)).toBeLessThan(0.5);
    });
    it(`${c.name}: the first refractor (flat in the model) planar within 0.5° of level, from the three-layer map's depths`, () => {
      const r = interpret({ ...lineOf(c), options: { layers: 3, residuals: false } });
      const dip = r.features.dip;
      expect(dip?.source, 'a χ²-accepted plane through the first refractor').toBe('refractor-elevations');
      expect(Math.abs(dip!.degrees)).toBeLessThan(0.5);
    });
  }
});

/**
 * A step in the rock under a three-layer line, three layers asked for. Model: soil 400 m/s
 * over a flat weathered layer 1600 m/s at 4 m over rock 3400 m/s at 12 m, 3 m deeper for
 * x > 35 m (a vertical step); 48 geophones at 1.5 m, off-end shots 45 m out, eikonal picks.
 * The far shots see only the rock, and the step kinks their branch: read alone, each looks
 * like two refracted branches (3076 and 3386 m/s on the west). Read against the line (both
 * nearer the line's branch 2 than its branch 1) they are rock throughout
 * (engine/branches/assign-branches.ts, withFarOffEndSides). Before that rule this line came
 * out 400/2403/4771 m/s with rock depths 20 m off.
 */
describe('three layers asked for over a step in the rock', () => {
  const FAR_X = 500;
  const stepX = 35;
  const model: LayeredModel = {
    surface: [{ x: -FAR_X, elevation: 0 }, { x: FAR_X, elevation: 0 }],
    layers: [
      { velocity: 400 },
      { velocity: 1600, top: [{ x: -FAR_X, elevation: -4 }, { x: FAR_X, elevation: -4 }] },
      { velocity: 3400, top: [{ x: -FAR_X, elevation: -12 }, { x: stepX - 0.01, elevation: -12 }, { x: stepX + 0.01, elevation: -15 }, { x: FAR_X, elevation: -15 }] },
    ],
  };
  const L = 47 * 1.5;
  const survey = syntheticSurvey(model, {
    geophoneCount: 48,
    firstX: 0,
    spacing: 1.5,
    shots: [{ x: -45, id: 'W-off' }, { x: -0.75, id: 'W-end' }, { x: L / 2, id: 'mid' }, { x: L + 0.75, id: 'E-end' }, { x: L + 45, id: 'E-off' }],
    name: 'rock step 3 m at x = 35 m',
  });
  const r = interpret({ ...survey, options: { layers: 3, residuals: false } });

  it('reads the far off-end shots as rock throughout', () => {
    for (const id of ['W-off', 'E-off']) {
      const shot = r.shots.find((s) => s.id === id)!;
      expect(shot.branchOfPick.filter((b) => b !== null).every((b) => b === 2), id).toBe(true);
    }
  });

  it('gives the three velocities within 3 % and the rock within 5 % away from the step (more than 10 m from it)', () => {
    [400, 1600, 3400].forEach((v, i) => expect(Math.abs(r.layers[i].velocity / v - 1), `V${i + 1} = ${r.layers[i].velocity}`).toBeLessThan(0.03));
    for (const s of r.stations) {
      if (Math.abs(s.x - stepX) <= 10 || typeof s.depths[1] !== 'number') continue;
      const truth = s.x > stepX ? 15 : 12;
      expect(Math.abs(s.depths[1] / truth - 1), `x = ${s.x}: ${s.depths[1]} m against ${truth} m`).toBeLessThan(0.05);
    }
  });
});

/**
 * Noisy picks, the line read as one (engine/branches/assign-branches.ts, withLineCrossover).
 * Invented model: soil 400 m/s over weathered rock 1600 m/s at 4 m over rock 3400 m/s at
 * 12 m, all flat; 48 geophones at 1.5 m, shots at both ends, mid-line and 45 m off each end;
 * eikonal picks with Gaussian noise of 0.3 ms, seeds 1–10; no layer hint. The mid shot
 * records about 9 m of the rock branch on each side; with noise its own fit often misses
 * it, and before the joint rule seed 2 came out as two layers (407/3150 m/s) and seeds 1,
 * 5 and 6 put the east-end rock 35–73 % too deep (residual RMS up to 1.14 ms).
 * Bounds: velocities within 3 % and median depths within 5 % (issue 10 acceptance), the
 * residual RMS under twice the default pick uncertainty (the residuals-high rule of
 * engine/qc/residuals.ts, common practice).
 */
describe('noisy picks (0.3 ms, seeds 1–10): short rock branches read against the line', () => {
  const FAR_X = 500;
  const model: LayeredModel = {
    surface: [{ x: -FAR_X, elevation: 0 }, { x: FAR_X, elevation: 0 }],
    layers: [
      { velocity: 400 },
      { velocity: 1600, top: [{ x: -FAR_X, elevation: -4 }, { x: FAR_X, elevation: -4 }] },
      { velocity: 3400, top: [{ x: -FAR_X, elevation: -12 }, { x: FAR_X, elevation: -12 }] },
    ],
  };
  const L = 47 * 1.5;
  const runs = Array.from({ length: 10 }, (_, k) => {
    const survey = syntheticSurvey(
      model,
      { geophoneCount: 48, firstX: 0, spacing: 1.5, shots: [-45, -0.75, L / 2, L + 0.75, L + 45].map((x) => ({ x })), name: `flat three layers, seed ${k + 1}` },
      { noiseMs: 0.3, seed: k + 1 },
    );
    return { seed: k + 1, r: interpret(survey) };
  });

  it('every seed: three layers, each velocity within 3 %, residual RMS under 1 ms', () => {
    for (const { seed, r } of runs) {
      expect(r.layers.length, `seed ${seed}`).toBe(3);
      [400, 1600, 3400].forEach((v, i) => expect(Math.abs(r.layers[i].velocity / v - 1), `seed ${seed}: V${i + 1} = ${r.layers[i].velocity}`).toBeLessThan(0.03));
      expect(r.qc.residuals!.rmsMs, `seed ${seed}`).toBeLessThan(1);
    }
  });

  it('median depths of both refractors over all seeds within 5 %', () => {
    for (const [k, truth] of [[0, 4], [1, 12]] as const) {
      const depths = runs.flatMap(({ r }) => r.stations.map((s) => s.depths[k]).filter((d): d is number => typeof d === 'number'));
      const sorted = depths.sort((a, b) => a - b);
      expect(Math.abs(sorted[sorted.length >> 1] / truth - 1), `refractor ${k + 1}`).toBeLessThan(0.05);
    }
  });
});

/**
 * A rock step at mid-spread, no layer hint (engine/branches/assign-branches.ts,
 * withFarOffEndSides). Invented model: soil 400 m/s 2 m thick over weathered rock 1600 m/s
 * over rock 3400 m/s at 6 m, 10 m beyond x = 47 m (a vertical 4 m step); 48 geophones at
 * 2 m, shots 40 m off each end, at both ends and mid-spread; eikonal picks. The west end
 * shot records its rock branch across the step, kinked: read alone it is direct
 * 401 m/s, "first refractor" 3042 m/s, rock 3399 m/s. Before the end shots were read
 * against the line this gave V2 1977 m/s and rock depths of 8–19 m (RMS 2.5 ms).
 * Bounds: velocities within 3 % and median depths within 5 % (issue 10 acceptance) on
 * each side of the step, more than 10 m from it; every rock depth within 15 % (the first
 * stations past the west end shot's direct wave take middle-layer arrivals as rock and
 * come up to 14 % shallow).
 */
describe('a rock step under the end shots, layer count from the picks', () => {
  const FAR_X = 500;
  const stepX = 47;
  const model: LayeredModel = {
    surface: [{ x: -FAR_X, elevation: 0 }, { x: FAR_X, elevation: 0 }],
    layers: [
      { velocity: 400 },
      { velocity: 1600, top: [{ x: -FAR_X, elevation: -2 }, { x: FAR_X, elevation: -2 }] },
      { velocity: 3400, top: [{ x: -FAR_X, elevation: -6 }, { x: stepX - 0.01, elevation: -6 }, { x: stepX + 0.01, elevation: -10 }, { x: FAR_X, elevation: -10 }] },
    ],
  };
  const survey = syntheticSurvey(model, {
    geophoneCount: 48,
    firstX: 0,
    spacing: 2,
    shots: [-40, -1, 47, 95, 134].map((x) => ({ x })),
    name: 'rock step 4 m at x = 47 m',
  });
  const r = interpret(survey);

  it('three layers, each velocity within 3 %, residual RMS under 1 ms', () => {
    expect(r.layers).toHaveLength(3);
    [400, 1600, 3400].forEach((v, i) => expect(Math.abs(r.layers[i].velocity / v - 1), `V${i + 1} = ${r.layers[i].velocity}`).toBeLessThan(0.03));
    expect(r.qc.residuals!.rmsMs).toBeLessThan(1);
  });

  it('rock: median depth on each side of the step within 5 %, every station within 15 %', () => {
    const truth = (x: number): number => (x > stepX ? 10 : 6);
    for (const side of [-1, 1]) {
      const depths = r.stations
        .filter((s) => Math.sign(s.x - stepX) === side && Math.abs(s.x - stepX) > 10 && typeof s.depths[1] === 'number')
        .map((s) => s.depths[1] as number)
        .sort((a, b) => a - b);
      expect(depths.length).toBeGreaterThan(10);
      expect(Math.abs(depths[depths.length >> 1] / (side > 0 ? 10 : 6) - 1), `side ${side}`).toBeLessThan(0.05);
    }
    for (const s of r.stations) {
      if (Math.abs(s.x - stepX) <= 10) continue;
      expect(Math.abs((s.depths[1] as number) / truth(s.x) - 1), `x = ${s.x}: ${s.depths[1]}`).toBeLessThan(0.15);
    }
  });
});

/**
 * Thin soil: the end shots' few direct picks (engine/branches/assign-branches.ts,
 * withDirectNearShot). Invented model: soil 412 m/s 1.7 m thick over 1937 m/s to 9.8 m
 * over 4426 m/s, flat; 48 geophones at 1.5 m, off-end shots 54 m out, eikonal picks. The
 * direct wave is first only to about 4.2 m (x_c = 2·h1·√((V2 + V1)/(V2 − V1)), Kearey,
 * Brooks & Hill 2002, ch. 5): three picks of each end shot. The robust fit used to trim two
 * of them as outliers and read the side as refracted from the shot, which put them on the
 * first refractor: residual RMS 1.02 ms on exact picks and the soil 13 % thin.
 */
describe('thin soil: an end shot\'s few direct picks stay direct', () => {
  const c: ThreeLayerCase = { name: 'thin soil 412/1937/4426, 1.7 and 9.8 m, 48 × 1.5 m, off-end 54 m', v: [412, 1937, 4426], z1: 1.7, z2: 9.8, dipDeg: 0, geophones: 48, spacingM: 1.5, offEndM: 54 };
  const survey = lineOf(c);
  const r = interpret(survey);

  it('reads the end shots\' picks inside the crossover distance as direct', () => {
    const xc = 2 * c.z1 * Math.sqrt((c.v[1] + c.v[0]) / (c.v[1] - c.v[0]));
    for (const id of ['W-end', 'E-end']) {
      const shot = r.shots.find((s) => s.id === id)!;
      survey.geophones.forEach((g, i) => {
        if (Math.abs(g.x - shot.x) < xc - 0.5) expect(shot.branchOfPick[i], `${id} at x = ${g.x}`).toBe(0);
      });
    }
  });

  it('velocities within 1 %, median depths within 2 %, residual RMS under 0.5 ms', () => {
    expect(r.layers).toHaveLength(3);
    c.v.forEach((v, i) => expect(Math.abs(r.layers[i].velocity / v - 1), `V${i + 1}`).toBeLessThan(0.01));
    expect(r.qc.residuals!.rmsMs).toBeLessThan(0.5);
    for (const [k, truth] of [[0, c.z1], [1, c.z2]] as const) {
      const d = r.stations.map((s) => s.depths[k]).filter((v): v is number => typeof v === 'number').sort((a, b) => a - b);
      expect(Math.abs(d[d.length >> 1] / truth - 1), `refractor ${k + 1}`).toBeLessThan(0.02);
    }
  });
});
