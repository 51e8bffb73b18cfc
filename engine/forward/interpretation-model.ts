/**
 * An interpreted section as a layered earth model (model.ts), so first arrivals can be
 * modelled through it and compared with the picks (engine/residuals.ts).
 *
 * What goes in (all read from the interpretation and the survey's geometry, nothing else):
 * - ground: a polyline through the geophones and the shots at their elevations (a shot at
 *   a geophone's x takes the geophone's elevation, so the ground never steps there);
 * - layer 1: the top-layer velocity V1 per station (stations[].v1; a null falls back to
 *   layers[0].velocity), contacts halfway between stations with different values;
 * - layer 2: its top is the polyline of the first refractor's elevation under every
 *   station (stations[].refractorElevation, i.e. elevation − depth); its velocity is the
 *   `refractorVelocity` segments, with contacts halfway between neighbouring segments;
 * - layer 3, when the interpretation has a third layer velocity and second-refractor depths
 *   (stations[].depths[1]): its top is elevation − depths[1] under every station.
 *
 * Stations without a depth (no coverage):
 * - between two stations with depths, the refractor elevation is interpolated linearly in x;
 * - beyond the outermost station with a depth (and on to the edge of the model, past the
 *   off-end shots), the refractor is continued along the interpretation's planar dip
 *   (features.dip) when the interpretation reports one, and flat (the outermost refractor
 *   elevation held) when it does not. Our choice: it adds nothing the interpretation does
 *   not say. The second refractor is anchored under off-end shots by their branch-2 picks
 *   (secondRefractorAnchors) and beyond that continued along the least-squares slope of its
 *   own interpreted elevations (it has no reported dip of its own; the trend of its depths
 *   is what the interpretation says about it).
 * The model reaches MODEL_MARGIN_X_M beyond the outermost shot or geophone.
 *
 * Units: m, m/s. Pure; never throws for an interpretation without depths (it says why).
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation } from '../output/interpretation.js';
import type { GridExtent, LateralVelocity, LayeredModel, ModelLayer } from './model.js';
import { GROUND_SKIN_CELLS, MODEL_LIMITS, layerVelocityAt } from './model.js';
import { elevationAt, type ModelPoint } from './polyline.js';
import { nodesAlong } from './velocity-grid.js';
import { isFiniteNumber } from '../shared/numbers.js';

/** How far the model reaches beyond the outermost shot or geophone, m. */
export const MODEL_MARGIN_X_M = 2;

/** Depth of the model below the deepest interface, m (head waves need only a few cells there). */
export const MODEL_DEPTH_BELOW_M = 2;

/**
 * Grid cell: what the picks can resolve, from the geophone spacing d and the thinnest
 * layer h under the geophones:
 *   cell = d / n,  n = ⌈max(CELLS_PER_SPACING, CELLS_PER_LAYER·d/h, d/RESIDUAL_MAX_CELL_M)⌉,
 * a whole number of cells per spacing (evenly spaced geophones on grid nodes), not below
 * RESIDUAL_MIN_CELL_M, then coarsened until the grid holds at most RESIDUAL_MAX_NODES nodes
 * and the whole line at most RESIDUAL_MAX_NODE_SOLVES node-solves. One grid per line,
 * shared by every shot. Our choice, from measurement on the 66 recorded lines
 * (docs/developers/residuals.md): the modelled times are compared only at the geophones,
 * so a cell finer than a quarter spacing adds little the picks can show; a head wave's
 * path needs several cells across the layer above it (3 m layers: noise-free RMS 0.02 ms
 * at 9 cells across, 0.12 ms at 8 cells when the geophones fell between nodes); over
 * dipping refractors 0.75 m cells gave 0.11 ms, 0.6 m 0.06 ms. With this rule no
 * recorded noise-free line went above 0.1 ms; the former fixed min(0.5 m, spacing/6) gave
 * RMS within 0.02 ms of it at 1.2–2× the nodes.
 */
export const RESIDUAL_MAX_CELL_M = 0.6;
export const RESIDUAL_MIN_CELL_M = 0.1;
export const CELLS_PER_SPACING = 4;
export const CELLS_PER_LAYER = 8;
export const RESIDUAL_MAX_NODES = 300_000;
/** About one second of solving on the 2-core machine (0.3–0.4 µs per node and shot). */
export const RESIDUAL_MAX_NODE_SOLVES = 3_000_000;

export interface InterpretationModel {
  ok: true;
  model: LayeredModel;
  /** Number of refractors in the model (1 or 2). */
  refractorCount: number;
  /** x of stations whose first-refractor elevation was interpolated between neighbours. */
  interpolatedX: number[];
  /** x of stations whose first-refractor elevation was continued beyond the outermost depth. */
  extrapolatedX: number[];
  /** How the refractor was continued beyond the outermost depths. */
  continuation: 'planar-dip' | 'flat';
  /** Refractor points placed under shots beyond the outermost depth, from their shot delay times. */
  shotAnchors: ShotAnchor[];
  /** x range the model covers, m (shots and geophones plus the margin). */
  xMinM: number;
  xMaxM: number;
}

/** The refractor under a shot beyond the outermost station with a depth. */
export interface ShotAnchor {
  shot: string;
  x: number;
  /** Delay time of the shot, ms: median of t − delay(G) − |x_G − x_S|/V2 over its refracted picks. */
  delayTimeMs: number;
  /** Refractor elevation placed under the shot, m. */
  refractorElevation: number;
  /** Refracted picks used. */
  count: number;
}

export interface NoInterpretationModel {
  ok: false;
  /** A sentence for the warning: why no model could be built. */
  reason: string;
}

/**
 * The layered model of an interpretation (see the file comment), or why there is none.
 * @example
 *   const built = modelFromInterpretation(survey, interpret(survey));
 *   if (built.ok) buildVelocityGrid(built.model, residualGridExtent(built, survey).extent);
 */
export function modelFromInterpretation(survey: Survey, interpretation: Interpretation): InterpretationModel | NoInterpretationModel {
  const v1Mean = interpretation.layers[0]?.velocity;
  const v2Mean = interpretation.layers[1]?.velocity;
  if (!isVelocity(v1Mean) || !isVelocity(v2Mean)) {
    return { ok: false, reason: 'the interpretation has no top-layer and refractor velocities' };
  }
  const stations = interpretation.stations;
  if (stations.length !== survey.geophones.length || stations.length === 0) {
    return { ok: false, reason: 'the interpretation does not give one station per geophone' };
  }
  const xs = stations.map((s) => s.x);
  const ground = stations.map((s, i) => (isFiniteNumber(s.elevation) ? s.elevation : survey.geophones[i].elevation ?? 0));
  const firstDepth = stations.map((s) => (isFiniteNumber(s.depth) ? s.depth : null));
  if (firstDepth.every((d) => d === null)) {
    return { ok: false, reason: 'no station has a depth to the refractor' };
  }

  const shotXs = survey.shots.map((s) => s.x);
  const xMinM = Math.min(...xs, ...shotXs) - MODEL_MARGIN_X_M;
  const xMaxM = Math.max(...xs, ...shotXs) + MODEL_MARGIN_X_M;
  const surface = groundSurface(survey, interpretation);

  const dip = interpretation.features?.dip;
  const slope = dip && isFiniteNumber(dip.degrees) && Math.abs(dip.degrees) < 45 ? -Math.tan((dip.degrees * Math.PI) / 180) : 0;
  const v2Along = refractorVelocity(interpretation, v2Mean);
  const anchors = shotAnchors(survey, interpretation, xs, firstDepth, surface, v1Mean, v2Along, slope);
  const first = interfaceUnderStations(xs, ground, firstDepth, slope, xMinM, xMaxM, anchors);

  const layers: ModelLayer[] = [
    { velocity: topLayerVelocity(interpretation, v1Mean) },
    { velocity: v2Along, top: first.points },
  ];
  const v3 = interpretation.layers[2]?.velocity;
  const secondDepth = stations.map((s) => (isFiniteNumber(s.depths?.[1]) ? (s.depths[1] as number) : null));
  if (isVelocity(v3) && secondDepth.some((d) => d !== null)) {
    const secondSlope = fittedSlope(xs, ground, secondDepth);
    const v1At = (x: number): number => layerVelocityAt(layers[0].velocity, x);
    const v2At = (x: number): number => layerVelocityAt(v2Along, x);
    const secondAnchors = secondRefractorAnchors(survey, interpretation, xs, ground, secondDepth, surface, first.points, v1At, v2At, v3);
    layers.push({ velocity: v3, top: interfaceUnderStations(xs, ground, secondDepth, secondSlope, xMinM, xMaxM, secondAnchors).points });
  }
  return {
    ok: true,
    model: { surface, layers },
    refractorCount: layers.length - 1,
    interpolatedX: first.interpolated.map((i) => xs[i]),
    extrapolatedX: first.extrapolated.map((i) => xs[i]),
    continuation: slope !== 0 ? 'planar-dip' : 'flat',
    shotAnchors: anchors,
    xMinM,
    xMaxM,
  };
}

/**
 * The grid for modelling a line through an interpretation model: x over the model's
 * range, elevations from MODEL_DEPTH_BELOW_M under the deepest interface to the ground
 * skin above the highest ground, cell size as RESIDUAL_MAX_CELL_M describes.
 * Cost O(G log G + V log V) for G geophones and V model vertices.
 */
export function residualGridExtent(built: InterpretationModel, survey: Survey): { extent: GridExtent; nodes: number } {
  const xs = survey.geophones.map((g) => g.x);
  const spacings = xs.slice(1).map((x, i) => x - xs[i]).sort((a, b) => a - b);
  const medianSpacing = spacings.length > 0 ? spacings[Math.floor(spacings.length / 2)] : RESIDUAL_MAX_CELL_M * CELLS_PER_SPACING;
  const { xMinM, xMaxM, model } = built;
  // Under the geophones: what the picks see (the model's continuation beyond them may thin out).
  const layerM = xs.length > 0 ? thinnestLayerM(model, Math.min(...xs), Math.max(...xs)) : Infinity;
  // A whole number of cells per spacing, so that evenly spaced geophones sit on grid nodes.
  const perSpacing = Math.ceil(Math.max(CELLS_PER_SPACING, (CELLS_PER_LAYER * medianSpacing) / layerM, medianSpacing / RESIDUAL_MAX_CELL_M) - 1e-9);
  let cellM = Math.max(RESIDUAL_MIN_CELL_M, Math.min(RESIDUAL_MAX_CELL_M, medianSpacing / perSpacing));
  const high = polylineMax(model.surface, xMinM, xMaxM);
  let low = polylineMin(model.surface, xMinM, xMaxM);
  for (const layer of model.layers) if (layer.top) low = Math.min(low, polylineMin(layer.top, xMinM, xMaxM));
  const shots = Math.max(1, survey.shots.length);
  for (;;) {
    const extent = {
      xMin: xMinM,
      xMax: xMaxM,
      zMin: low - Math.max(MODEL_DEPTH_BELOW_M, 4 * cellM),
      zMax: high + (GROUND_SKIN_CELLS + 1) * cellM,
      cellM,
    };
    const nodes = nodesAlong(extent.xMax - extent.xMin, cellM) * nodesAlong(extent.zMax - extent.zMin, cellM);
    const over = Math.max(nodes / RESIDUAL_MAX_NODES, (nodes * shots) / RESIDUAL_MAX_NODE_SOLVES);
    if (over <= 1) return { extent, nodes };
    // Nodes scale as 1/cell²; overshoot a little so the loop ends in one or two steps.
    cellM *= Math.sqrt(over) * 1.02;
  }
}

/**
 * Ground surface through the geophones and shots. Shots take their own elevation, or the
 * one the interpretation used for them; a shot within 1 mm of a geophone adds no vertex.
 */
function groundSurface(survey: Survey, interpretation: Interpretation): ModelPoint[] {
  const points: ModelPoint[] = interpretation.stations.map((s, i) => ({
    x: s.x,
    elevation: isFiniteNumber(s.elevation) ? s.elevation : survey.geophones[i].elevation ?? 0,
  }));
  const geophoneSurface = [...points];
  for (const shot of survey.shots) {
    if (geophoneSurface.some((p) => Math.abs(p.x - shot.x) < 1e-3)) continue;
    points.push({ x: shot.x, elevation: shotElevationM(survey, interpretation, shot.id, shot.x, geophoneSurface) });
  }
  points.sort((a, b) => a.x - b.x);
  // Two shots at one x (rare, but valid input) would make a step: keep the first.
  return points.filter((p, k) => k === 0 || p.x - points[k - 1].x > 1e-6);
}

/** Elevation of a shot as the interpretation used it: its own, else from the geophones. */
export function shotElevationM(survey: Survey, interpretation: Interpretation, id: string, x: number, geophoneSurface: ModelPoint[]): number {
  const own = survey.shots.find((s) => s.id === id)?.elevation;
  if (isFiniteNumber(own)) return own;
  const analysed = interpretation.shots?.find((s) => s.id === id)?.elevation;
  if (isFiniteNumber(analysed)) return analysed;
  return elevationAt(geophoneSurface, x);
}

/**
 * Interface elevation under each station from depths (null = unknown), as a polyline that
 * reaches xMin..xMax: gaps interpolated linearly, the ends continued with `slope` (dz/dx).
 */
function interfaceUnderStations(
  xs: number[],
  ground: number[],
  depths: (number | null)[],
  slope: number,
  xMin: number,
  xMax: number,
  anchors: readonly ShotAnchor[] = [],
): { points: ModelPoint[]; interpolated: number[]; extrapolated: number[] } {
  const known = xs.map((_, i) => i).filter((i) => depths[i] !== null);
  const elevation = (i: number): number => ground[i] - (depths[i] as number);
  const firstK = known[0];
  const lastK = known[known.length - 1];
  const interpolated: number[] = [];
  const extrapolated: number[] = [];
  // Control points: stations with depths, and the shot anchors beyond them on either side.
  const control: ModelPoint[] = known.map((i) => ({ x: xs[i], elevation: elevation(i) }));
  for (const a of anchors) {
    if (a.x < xs[firstK] || a.x > xs[lastK]) control.push({ x: a.x, elevation: a.refractorElevation });
  }
  control.sort((p, q) => p.x - q.x);
  const left = control[0];
  const right = control[control.length - 1];
  // Linear between control points; beyond the outermost, continued with `slope`.
  const at = (x: number): number => {
    if (x <= left.x) return left.elevation + slope * (x - left.x);
    if (x >= right.x) return right.elevation + slope * (x - right.x);
    return elevationAt(control, x);
  };
  const xsAll = [...new Set([xMin, ...xs, ...control.map((p) => p.x), xMax])]
    .filter((x) => x >= xMin && x <= xMax)
    .sort((p, q) => p - q);
  xs.forEach((_, i) => {
    if (depths[i] !== null) return;
    (i < firstK || i > lastK ? extrapolated : interpolated).push(i);
  });
  const points = xsAll.map((x) => ({ x, elevation: at(x) }));
  return { points: thin(points), interpolated, extrapolated };
}

/**
 * The refractor under each shot that lies beyond the outermost station with a depth, from
 * the shot's own refracted picks: its delay time (the delay-time form of the head-wave
 * time, t = a_S + a_G + |x_G − x_S|/V2, Willmore & Bancroft 1960; Hagedoorn 1959)
 *     a_S = median over refracted picks G of (t_G − a_G − ∫ dx/V2(x) from x_G to x_S)
 * with a_G the interpretation's delay time at G and V2(x) the model's refractor velocity
 * (so the anchor agrees with the model it is placed in), then the depth a_S·V1·V2/√(V2² − V1²)
 * below the shot (normal depth taken as vertical). Our choice: the interpretation says
 * nothing about the refractor beyond its outermost depth, and an off-end shot's times
 * depend on it through one number, its delay time; fitting that number keeps an unknown
 * refractor there from posing as misfit. Needs MIN_ANCHOR_PICKS picks; else no anchor.
 */
function shotAnchors(
  survey: Survey,
  interpretation: Interpretation,
  xs: number[],
  depths: (number | null)[],
  surface: ModelPoint[],
  v1: number,
  v2Along: number | LateralVelocity,
  slope: number,
): ShotAnchor[] {
  const known = xs.filter((_, i) => depths[i] !== null);
  const lo = known[0];
  const hi = known[known.length - 1];
  const anchors: ShotAnchor[] = [];
  for (const shot of survey.shots) {
    if (shot.x >= lo && shot.x <= hi) continue;
    const analysis = interpretation.shots?.find((a) => a.id === shot.id);
    if (!analysis) continue;
    const samples: number[] = [];
    shot.times.forEach((t, i) => {
      const delay = interpretation.stations[i]?.delayTime;
      if (analysis.branchOfPick?.[i] !== 1 || typeof t !== 'number' || !isFiniteNumber(delay)) return;
      // Along the refractor at the model's own V2(x), so the anchor agrees with the model it goes into.
      samples.push(t - delay - slownessIntegralMs(v2Along, xs[i], shot.x));
    });
    if (samples.length < MIN_ANCHOR_PICKS) continue;
    samples.sort((a, b) => a - b);
    const m = samples.length >> 1;
    const delayTimeMs = samples.length % 2 ? samples[m] : 0.5 * (samples[m - 1] + samples[m]);
    if (!(delayTimeMs > 0)) continue;
    const v2 = layerVelocityAt(v2Along, shot.x);
    if (!(v2 > v1)) continue;
    const depthPerDelayM = (v1 * v2) / Math.sqrt(v2 * v2 - v1 * v1) / 1000;
    const ground = elevationAt(surface, shot.x);
    // Vertical depth from the normal depth over a refractor of the interpretation's dip.
    const refractorElevation = ground - (delayTimeMs * depthPerDelayM) * Math.sqrt(1 + slope * slope);
    anchors.push({ shot: shot.id, x: shot.x, delayTimeMs, refractorElevation, count: samples.length });
  }
  return anchors;
}

/**
 * Least-squares slope dz/dx of the interface elevations ground − depth over the stations
 * with a depth (0 with fewer than two). O(n). Ordinary least squares, Gauss; the slope of
 * the interpretation's own interface, used only to continue it beyond its outermost depth.
 */
function fittedSlope(xs: number[], ground: number[], depths: (number | null)[]): number {
  let n = 0;
  let sx = 0;
  let sz = 0;
  let sxx = 0;
  let sxz = 0;
  xs.forEach((x, i) => {
    const d = depths[i];
    if (d === null) return;
    const z = ground[i] - d;
    n++;
    sx += x;
    sz += z;
    sxx += x * x;
    sxz += x * z;
  });
  const den = n * sxx - sx * sx;
  if (n < 2 || !(Math.abs(den) > 1e-9)) return 0;
  const slope = (n * sxz - sx * sz) / den;
  return Math.abs(slope) < 1 ? slope : 0;
}

/**
 * Delay time of a point above the second refractor, ms, by the flat-layer form of the
 * multi-layer head wave (Kearey, Brooks & Hill 2002, ch. 5; Telford, Geldart & Sheriff
 * 1990, ch. 4): δ₂ = h1·cos θ13/V1 + h2·cos θ23/V2, sin θi3 = Vi/V3, h1 the depth to the
 * first refractor and h2 = z2 − h1.
 */
function secondDelayMs(h1: number, z2: number, v1: number, v2: number, v3: number): number {
  const c13 = Math.sqrt(Math.max(0, 1 - (v1 / v3) ** 2));
  const c23 = Math.sqrt(Math.max(0, 1 - (v2 / v3) ** 2));
  return 1000 * ((h1 * c13) / v1 + (Math.max(0, z2 - h1) * c23) / v2);
}

/**
 * The second refractor under each shot beyond the outermost station with a second depth,
 * from the shot's branch-2 picks, as shotAnchors does for the first: the shot's delay
 *     δ₂(S) = median over branch-2 picks G of (t_G − δ₂(G) − |x_G − x_S|/V3)
 * (delay-time form, Willmore & Bancroft 1960), δ₂(G) from the interpretation's two depths
 * at G (secondDelayMs), then h2 under the shot solved from δ₂(S) with h1 read off the
 * model's first refractor there. O(picks) per shot. Our choice, as for the first refractor:
 * an off-end shot's branch-2 times depend on the unknown refractor under it through one
 * number. Needs MIN_ANCHOR_PICKS picks and V1 < V2 < V3; else no anchor.
 */
function secondRefractorAnchors(
  survey: Survey,
  interpretation: Interpretation,
  xs: number[],
  ground: number[],
  depths: (number | null)[],
  surface: ModelPoint[],
  firstTop: ModelPoint[],
  v1At: (x: number) => number,
  v2At: (x: number) => number,
  v3: number,
): ShotAnchor[] {
  const known = xs.filter((_, i) => depths[i] !== null);
  const lo = known[0];
  const hi = known[known.length - 1];
  const anchors: ShotAnchor[] = [];
  for (const shot of survey.shots) {
    if (shot.x >= lo && shot.x <= hi) continue;
    const analysis = interpretation.shots?.find((a) => a.id === shot.id);
    if (!analysis) continue;
    const samples: number[] = [];
    shot.times.forEach((t, i) => {
      const z2 = depths[i];
      const h1 = interpretation.stations[i]?.depths?.[0];
      if (analysis.branchOfPick?.[i] !== 2 || typeof t !== 'number' || z2 === null || !isFiniteNumber(h1)) return;
      const v1 = v1At(xs[i]);
      const v2 = v2At(xs[i]);
      if (!(v1 < v2 && v2 < v3)) return;
      samples.push(t - secondDelayMs(h1, z2, v1, v2, v3) - (1000 * Math.abs(xs[i] - shot.x)) / v3);
    });
    if (samples.length < MIN_ANCHOR_PICKS) continue;
    samples.sort((a, b) => a - b);
    const m = samples.length >> 1;
    const delayTimeMs = samples.length % 2 ? samples[m] : 0.5 * (samples[m - 1] + samples[m]);
    const v1 = v1At(shot.x);
    const v2 = v2At(shot.x);
    const groundAt = elevationAt(surface, shot.x);
    const h1 = Math.max(0, groundAt - elevationAt(firstTop, shot.x));
    const c23 = Math.sqrt(Math.max(0, 1 - (v2 / v3) ** 2));
    if (!(v1 < v2 && v2 < v3) || !(c23 > 0)) continue;
    const h2 = ((delayTimeMs - secondDelayMs(h1, h1, v1, v2, v3)) * v2) / (1000 * c23);
    if (!(h2 > 0)) continue;
    anchors.push({ shot: shot.id, x: shot.x, delayTimeMs, refractorElevation: groundAt - h1 - h2, count: samples.length });
  }
  return anchors;
}

/** ∫ 1000/V(x) dx between a and b (either order), ms, for a piecewise-constant velocity. */
function slownessIntegralMs(velocity: number | LateralVelocity, a: number, b: number): number {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  if (typeof velocity === 'number') return (1000 * (hi - lo)) / velocity;
  const cuts = [lo, ...velocity.contactsX.filter((c) => c > lo && c < hi), hi];
  let sum = 0;
  for (let k = 1; k < cuts.length; k++) {
    sum += (1000 * (cuts[k] - cuts[k - 1])) / layerVelocityAt(velocity, 0.5 * (cuts[k] + cuts[k - 1]));
  }
  return sum;
}

/** Fewest refracted picks for a shot's delay time. */
export const MIN_ANCHOR_PICKS = 3;

/** Piecewise-constant V1 from the stations, merged where neighbours agree. */
function topLayerVelocity(interpretation: Interpretation, fallback: number): number | LateralVelocity {
  const values = interpretation.stations.map((s) => (isVelocity(s.v1) ? s.v1 : fallback));
  const xs = interpretation.stations.map((s) => s.x);
  const contactsX: number[] = [];
  const velocities: number[] = [values[0]];
  for (let i = 1; i < values.length; i++) {
    if (values[i] === velocities[velocities.length - 1]) continue;
    contactsX.push(0.5 * (xs[i - 1] + xs[i]));
    velocities.push(values[i]);
  }
  return contactsX.length === 0 ? velocities[0] : { contactsX, velocities };
}

/**
 * Refractor velocity from the `refractorVelocity` segments (sorted by `from`): each
 * segment's velocity holds from halfway after the previous segment's end to halfway
 * before the next one's start; beyond the outermost segments it holds on.
 */
function refractorVelocity(interpretation: Interpretation, fallback: number): number | LateralVelocity {
  const segments = (interpretation.refractorVelocity ?? [])
    .filter((s) => isVelocity(s.velocity) && isFiniteNumber(s.from) && isFiniteNumber(s.to))
    .sort((a, b) => a.from - b.from);
  if (segments.length === 0) return fallback;
  const contactsX: number[] = [];
  const velocities: number[] = [segments[0].velocity];
  for (let k = 1; k < segments.length && contactsX.length < MODEL_LIMITS.maxContactsPerLayer; k++) {
    const contact = 0.5 * (segments[k - 1].to + segments[k].from);
    if (segments[k].velocity === velocities[velocities.length - 1]) continue;
    if (contactsX.length > 0 && !(contact > contactsX[contactsX.length - 1])) continue; // overlapping segments: keep the first
    contactsX.push(contact);
    velocities.push(segments[k].velocity);
  }
  return contactsX.length === 0 ? velocities[0] : { contactsX, velocities };
}

/** Keeps at most MODEL_LIMITS.maxVerticesPerPolyline vertices (evenly chosen, ends kept). */
function thin(points: ModelPoint[]): ModelPoint[] {
  const max = MODEL_LIMITS.maxVerticesPerPolyline;
  if (points.length <= max) return points;
  const out: ModelPoint[] = [];
  for (let k = 0; k < max; k++) out.push(points[Math.round((k * (points.length - 1)) / (max - 1))]);
  return out;
}

/**
 * Least vertical thickness of any layer above an interface inside [xMin, xMax], m: the
 * ground to the first interface, and each interface to the next, compared at every vertex
 * of either polyline and at the ends (both are linear in between, so the least distance
 * is at one of those x). Infinity without an interface. O(V log V) for V vertices.
 */
function thinnestLayerM(model: LayeredModel, xMin: number, xMax: number): number {
  const bounds: readonly ModelPoint[][] = [model.surface, ...model.layers.flatMap((l) => (l.top ? [l.top] : []))];
  let least = Infinity;
  for (let k = 0; k + 1 < bounds.length; k++) {
    const upper = bounds[k];
    const lower = bounds[k + 1];
    const at = (x: number): void => {
      const thickness = elevationAt(upper, x) - elevationAt(lower, x);
      // Where the interfaces touch or cross the layer is absent, not thin.
      if (x >= xMin && x <= xMax && thickness > 0) least = Math.min(least, thickness);
    };
    at(xMin);
    at(xMax);
    for (const p of upper) at(p.x);
    for (const p of lower) at(p.x);
  }
  return least;
}

function polylineMin(points: readonly ModelPoint[], xMin: number, xMax: number): number {
  let v = Math.min(elevationAt(points, xMin), elevationAt(points, xMax));
  for (const p of points) if (p.x > xMin && p.x < xMax) v = Math.min(v, p.elevation);
  return v;
}

function polylineMax(points: readonly ModelPoint[], xMin: number, xMax: number): number {
  let v = Math.max(elevationAt(points, xMin), elevationAt(points, xMax));
  for (const p of points) if (p.x > xMin && p.x < xMax) v = Math.max(v, p.elevation);
  return v;
}


function isVelocity(v: unknown): v is number {
  return isFiniteNumber(v) && v >= MODEL_LIMITS.minVelocityMPerS && v <= MODEL_LIMITS.maxVelocityMPerS;
}
