/**
 * A survey and a hand-made, plausible interpretation for rendering tests, built from the
 * closed-form planar refractor (engine/forward/planar-refractor.ts; Kearey, Brooks & Hill
 * 2002, ch. 5). Depths, elevations and arc radii are the model's exact values, so a test
 * can check that the drawing puts each vertex where the interpretation says. The branch
 * lines are least-squares fits to the fixture's own picks (done here, not by the engine).
 * Invented data: for the renderer's tests and previews only.
 *
 * Also: `parseSvg`, which reads a rendered SVG string back into an svgdom document.
 */
import { createSVGWindow } from 'svgdom';
import {
  directWaveTimeMs,
  firstArrivalMs,
  headWaveTimeMs,
  perpendicularDistanceToRefractor,
  verticalDepthToRefractor,
  type PlanarRefractorModel,
  type SurfacePoint,
} from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';
import type {
  BranchLine,
  Interpretation,
  ReciprocalCheck,
  ShotAnalysis,
  SideBranches,
  Station,
  Step,
  VelocityChange,
} from '../../engine/output/interpretation.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';

export const FIXTURE_MODEL: PlanarRefractorModel = { v1: 610, v2: 2450, refractorElevationAtZero: 37.6, dipDegrees: 4.2 };

export interface RenderFixtureOptions {
  name?: string;
  date?: string;
  /** Station indices given no coverage (null depth). */
  uncovered?: number[];
  steps?: Step[];
  velocityChanges?: VelocityChange[];
  refractorVelocity?: { from: number; to: number; velocity: number }[];
  /** Adds a second refractor this many metres below the first (depths[1]). */
  secondRefractorBelowM?: number;
  /** Makes the end-shot reciprocal check fail by this many ms. */
  reciprocalErrorMs?: number;
  /** Picks removed: [shot index, geophone index]. */
  deadPicks?: [number, number][];
  shotIds?: string[];
  /** Replaces dip with null ("no single planar dip"). */
  noDip?: boolean;
}

/** Invented gentle topography: metres. */
export function fixtureGround(xM: number): number {
  return Math.round((41.2 + 0.012 * xM + 0.35 * Math.sin(xM / 9)) * 100) / 100;
}

const GEOPHONE_XS = Array.from({ length: 24 }, (_, i) => 2 * i);
const SHOT_XS = [-12, -1, 23, 47, 58];
const DEFAULT_IDS = ['W-off', 'W-end', 'Mid', 'E-end', 'E-off'];

/** Least-squares straight line t = a + b·offset over (offset, t) pairs. */
function fitLine(points: { offset: number; t: number; x: number }[]): BranchLine | null {
  if (points.length < 2) return null;
  const n = points.length;
  const mx = points.reduce((s, p) => s + p.offset, 0) / n;
  const mt = points.reduce((s, p) => s + p.t, 0) / n;
  let sxx = 0;
  let sxt = 0;
  for (const p of points) {
    sxx += (p.offset - mx) ** 2;
    sxt += (p.offset - mx) * (p.t - mt);
  }
  if (sxx === 0) return null;
  const slope = sxt / sxx;
  const intercept = mt - slope * mx;
  const rms = Math.sqrt(points.reduce((s, p) => s + (p.t - intercept - slope * p.offset) ** 2, 0) / n);
  const xs = points.map((p) => p.x);
  return { velocity: 1000 / slope, interceptMs: intercept, fromX: Math.min(...xs), toX: Math.max(...xs), count: n, rmsMs: rms };
}

export interface RenderFixture {
  survey: Survey;
  interpretation: Interpretation;
  model: PlanarRefractorModel;
}

export function renderFixture(options: RenderFixtureOptions = {}): RenderFixture {
  const model = FIXTURE_MODEL;
  const ids = options.shotIds ?? DEFAULT_IDS;
  const geophones = GEOPHONE_XS.map((x) => ({ x, elevation: fixtureGround(x) }));
  const shotPoints: SurfacePoint[] = SHOT_XS.map((x) => ({ x, elevation: fixtureGround(x) }));
  const dead = new Set((options.deadPicks ?? []).map(([s, g]) => `${s}:${g}`));
  // Picks: exact first arrivals with a small fixed wobble (invented), rounded to 0.1 ms.
  const shots = shotPoints.map((p, k) => ({
    id: ids[k],
    x: p.x,
    elevation: p.elevation,
    times: geophones.map((g, i) =>
      dead.has(`${k}:${i}`) ? null : Math.round((firstArrivalMs(model, p, g) + 0.15 * Math.sin(1.7 * i + 0.9 * k)) * 10) / 10,
    ),
  }));
  const survey: Survey = {
    name: options.name ?? 'Line 3, pump-station terrace (fixture)',
    geophones,
    shots,
    options: { reciprocalToleranceMs: 3 },
  };
  if (options.date !== undefined) survey.date = options.date;

  const ic = Math.asin(model.v1 / model.v2);
  const uncovered = new Set(options.uncovered ?? []);
  const stations: Station[] = geophones.map((g, i) => {
    if (uncovered.has(i)) {
      return { x: g.x, elevation: g.elevation, delayTime: null, depth: null, refractorElevation: null, depths: [null], v1: model.v1, refractorVelocity: null, normalDepth: null, coverage: 'none' };
    }
    const depth = verticalDepthToRefractor(model, g);
    const normal = perpendicularDistanceToRefractor(model, g);
    const depths: (number | null)[] = [depth];
    if (options.secondRefractorBelowM !== undefined) depths.push(depth + options.secondRefractorBelowM);
    return {
      x: g.x,
      elevation: g.elevation,
      delayTime: (1000 * normal * Math.cos(ic)) / model.v1,
      depth,
      refractorElevation: g.elevation - depth,
      depths,
      v1: model.v1,
      refractorVelocity: model.v2,
      normalDepth: normal,
      coverage: 'pair',
      pairCount: 1,
    };
  });

  const analyses: ShotAnalysis[] = shots.map((shot, k) => {
    const p = shotPoints[k];
    const branchOfPick = geophones.map((g, i) => {
      if (shot.times[i] === null) return null;
      const head = headWaveTimeMs(model, p, g);
      return head !== null && head < directWaveTimeMs(model, p, g) ? 1 : 0;
    }) as (0 | 1 | null)[];
    const side = (which: 'left' | 'right'): SideBranches | null => {
      const on = geophones.map((g, i) => ({ g, i })).filter(({ g }) => (which === 'left' ? g.x < p.x : g.x > p.x));
      if (on.length === 0) return null;
      const pts = (branch: 0 | 1) =>
        on.filter(({ i }) => branchOfPick[i] === branch).map(({ g, i }) => ({ offset: Math.abs(g.x - p.x), t: shot.times[i] as number, x: g.x }));
      const direct = fitLine(pts(0));
      const refracted = fitLine(pts(1));
      let crossover: number | null = null;
      if (direct && refracted) {
        const sd = 1000 / direct.velocity!;
        const sr = 1000 / refracted.velocity!;
        crossover = (refracted.interceptMs - direct.interceptMs) / (sd - sr);
      }
      return { side: which, direct, refracted: refracted ? [refracted] : [], crossoverDistance: crossover, overridden: false };
    };
    return {
      id: shot.id,
      x: p.x,
      elevation: p.elevation,
      position: k === 0 ? 'off-end-left' : k === 1 ? 'end-left' : k === 2 ? 'inside' : k === 3 ? 'end-right' : 'off-end-right',
      left: side('left'),
      right: side('right'),
      branchOfPick,
      phantom: null,
      modelledMs: geophones.map((g) => firstArrivalMs(model, p, g)),
    };
  });
  // Phantom the end shots' direct-wave stretch from the off-end shot on the same side.
  for (const [endK, offK] of [[1, 0], [3, 4]] as const) {
    const end = analyses[endK];
    const off = shots[offK];
    const both = geophones.map((_, i) => i).filter((i) => end.branchOfPick[i] === 1 && off.times[i] !== null && shots[endK].times[i] !== null);
    const shift = both.reduce((s, i) => s + ((off.times[i] as number) - (shots[endK].times[i] as number)), 0) / Math.max(1, both.length);
    end.phantom = {
      fromShot: off.id,
      shiftMs: shift,
      parallelRmsMs: 0.1,
      times: geophones.map((_, i) => (end.branchOfPick[i] === 0 && off.times[i] !== null ? (off.times[i] as number) - shift : null)),
      fromShots: [off.id],
      checks: [{ fromShot: off.id, shiftMs: shift, parallelRmsMs: 0.1, overlapCount: both.length, parallel: true, used: true }],
    };
  }

  const reciprocal: ReciprocalCheck[] = [
    [1, 3],
    [0, 4],
  ].map(([a, b]) => {
    const forwardMs = headWaveTimeMs(model, shotPoints[a], shotPoints[b]) as number;
    const reverseMs = (headWaveTimeMs(model, shotPoints[b], shotPoints[a]) as number) + (a === 1 ? options.reciprocalErrorMs ?? 0.4 : 0.2);
    const differenceMs = forwardMs - reverseMs;
    return { shots: [ids[a], ids[b]], forwardMs, reverseMs, differenceMs, ok: Math.abs(differenceMs) <= 3, forwardSource: 'extrapolated', reverseSource: 'extrapolated', toleranceMs: 3 };
  });

  const perShot = shots.map((s, k) => {
    const m = analyses[k].modelledMs as number[];
    const r = s.times.map((t, i) => (t === null ? null : t - m[i])).filter((v): v is number => v !== null);
    return { shot: s.id, rmsMs: Math.sqrt(r.reduce((acc, v) => acc + v * v, 0) / Math.max(1, r.length)), count: r.length };
  });

  const layers = [{ velocity: model.v1 }, { velocity: model.v2 }];
  if (options.secondRefractorBelowM !== undefined) layers.push({ velocity: 4200 });
  const interpretation: Interpretation = {
    method: 'plus-minus',
    name: survey.name,
    stations,
    layers,
    refractorVelocity: options.refractorVelocity ?? [{ from: 0, to: 46, velocity: model.v2 }],
    features: {
      steps: options.steps ?? [],
      velocityChanges: options.velocityChanges ?? [],
      dip: options.noDip ? null : { degrees: model.dipDegrees, source: 'refractor-elevations' },
      localDips: [],
    },
    qc: {
      reciprocal,
      warnings: uncovered.size > 0 ? [{ code: 'no-coverage', message: 'No opposing shot pair covers these geophones.', x: geophones[[...uncovered][0]].x }] : [],
      residuals: {
        rmsMs: Math.sqrt(perShot.reduce((s, p) => s + p.rmsMs ** 2, 0) / perShot.length),
        perShot,
        count: perShot.reduce((s, p) => s + p.count, 0),
        cellM: 0.5,
        refractorContinuation: 'planar-dip',
      },
    },
    shots: analyses,
    velocityAnalysis: { v1: model.v1, directVelocities: [], pairs: [], minusTimeVelocity: null },
    cautions: [...CAUTIONS],
  };
  return { survey, interpretation, model };
}

/** Reads a rendered SVG string back into a document (svgdom's parser), for assertions. */
export function parseSvg(svgText: string): Element {
  const window = createSVGWindow();
  const holder = window.document.documentElement;
  holder.innerHTML = svgText;
  const root = holder.firstElementChild ?? (holder.firstChild as Element | null);
  if (!root || root.nodeName.toLowerCase() !== 'svg') throw new Error('parseSvg: the text is not one <svg> element');
  return root;
}

/** Elements with a data-role, in document order. */
export function byRole(root: Element, role: string): Element[] {
  return Array.from(root.querySelectorAll(`[data-role="${role}"]`));
}

/** Linear map between data values and plot units, recovered from the first and last axis ticks of a drawing. */
export function axisMap(root: Element, role: 'x-tick' | 'y-tick'): { toPlot: (v: number) => number; toData: (p: number) => number; plotPerUnit: number } {
  const ticks = byRole(root, role);
  if (ticks.length < 2) throw new Error(`axisMap: the drawing has ${ticks.length} ${role} tick(s), two are needed`);
  const attr = role === 'x-tick' ? 'x1' : 'y1';
  const first = ticks[0];
  const last = ticks[ticks.length - 1];
  const v0 = Number(first.getAttribute('data-value'));
  const v1 = Number(last.getAttribute('data-value'));
  const p0 = Number(first.getAttribute(attr));
  const p1 = Number(last.getAttribute(attr));
  const plotPerUnit = (p1 - p0) / (v1 - v0);
  return { toPlot: (v) => p0 + (v - v0) * plotPerUnit, toData: (p) => v0 + (p - p0) / plotPerUnit, plotPerUnit };
}
