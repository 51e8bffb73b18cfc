/**
 * Layered earth models for forward modelling, and the velocity grid built from them.
 *
 * A model is a ground surface and layers listed top down. Every layer but the first has a
 * `top`, the interface above it, as a polyline (see polyline.ts: steps, dips, undulations).
 * A layer's velocity is one number (m/s) or piecewise constant along the line: values
 * between contacts at given x. Which layer holds a point below the ground: the deepest
 * layer whose top lies at or above the point. So a deeper interface that rises above a
 * shallower one cuts it off (a refractor that outcrops or a layer that pinches out need no
 * special care), and above the ground surface is air.
 *
 * Grid building: each cell's slowness comes from the layers' exact share of the cell,
 * measured in CELL_SUBCOLUMNS vertical strips (exact along z, midpoint rule along x).
 * A cell cut by an interface gets
 *     s_cell² = s_min² + (Σ_m f_m·√(s_m² − s_min²))²
 * where f_m is each material's share of the ground in the cell and s_min the fastest
 * material's slowness. This is our choice, made so that a critically refracted ray
 * (horizontal slowness s_min) crosses the cell vertically in the same time as across the
 * true interface, Σ f_m·h·√(s_m² − s_min²); it moves the modelled interface to its true
 * elevation inside the cell instead of to a node row, which cuts the head-wave error from
 * first order in the cell size to well below it (measured: docs/developers/forward.md).
 * A cell that holds any ground is ground (its slowness from the ground part alone), and the
 * material at the surface continues GROUND_SKIN_CELLS cells up into the air, so a wave
 * along the surface never crosses air or a staircase of cut cells; cells above that are air.
 */
import { elevationAt, type ModelPoint } from './polyline.js';
import { GridError, MAX_GRID_NODES, checkGridSize, nodesAlong, type VelocityGrid } from './velocity-grid.js';
import type { Problem } from '../survey/problem.js';
import { isFiniteNumber } from '../shared/numbers.js';

export type { ModelPoint } from './polyline.js';

/** Velocity varying along the line: velocities[0] left of contactsX[0], velocities[i] from contactsX[i − 1] on. */
export interface LateralVelocity {
  /** x of each contact, m, strictly increasing. */
  contactsX: number[];
  /** Velocity of each segment, m/s; one more than there are contacts. */
  velocities: number[];
}

export interface ModelLayer {
  /** Velocity, m/s: one value, or piecewise constant along the line. */
  velocity: number | LateralVelocity;
  /** The interface above the layer (absent for the first layer, whose top is the ground surface). */
  top?: ModelPoint[];
}

export interface LayeredModel {
  /** Ground surface, at least one vertex, x non-decreasing. */
  surface: ModelPoint[];
  /** Layers top down, at least one. */
  layers: ModelLayer[];
}

/** Section to grid: x range along the line, elevation range, cell size (all m). */
export interface GridExtent {
  xMin: number;
  xMax: number;
  zMin: number;
  zMax: number;
  cellM: number;
}

/** Limits on a model's size, so a request cannot exhaust memory. */
export const MODEL_LIMITS = {
  maxLayers: 8,
  maxVerticesPerPolyline: 2048,
  maxContactsPerLayer: 1024,
  minVelocityMPerS: 10,
  maxVelocityMPerS: 20_000,
  maxCoordinateM: 1_000_000,
} as const;

/**
 * Thickness of the ground skin, in cells: the surface material is continued this far into
 * the air, so that straight rays along a sloping or curved surface run inside the solver's
 * ground instead of along a staircase of cut cells (measured: docs/developers/forward.md).
 */
export const GROUND_SKIN_CELLS = 2;

/** Vertical strips per cell used to measure each layer's share of the cell. */
export const CELL_SUBCOLUMNS = 8;

/** Thrown by buildVelocityGrid for a model that fails checkModel; carries every problem. */
export class ModelError extends Error {
  constructor(readonly problems: Problem[]) {
    super(problems.map((p) => `${p.path}: ${p.message}`).join(' '));
    this.name = 'ModelError';
  }
}

/** Velocity of a layer at x, m/s (right-continuous at contacts). */
export function layerVelocityAt(velocity: number | LateralVelocity, x: number): number {
  if (typeof velocity === 'number') return velocity;
  const { contactsX, velocities } = velocity;
  let seg = 0;
  while (seg < contactsX.length && x >= contactsX[seg]) seg++;
  return velocities[seg];
}

/**
 * Piecewise-constant velocity from one value per station (e.g. a top-layer velocity per
 * geophone from an interpretation): contacts halfway between neighbouring stations.
 */
export function lateralVelocityFromStations(stationXs: readonly number[], velocitiesMPerS: readonly number[]): LateralVelocity {
  if (stationXs.length !== velocitiesMPerS.length || stationXs.length === 0) {
    throw new RangeError(`Need one velocity per station: ${stationXs.length} stations, ${velocitiesMPerS.length} velocities.`);
  }
  const contactsX: number[] = [];
  for (let i = 1; i < stationXs.length; i++) contactsX.push(0.5 * (stationXs[i - 1] + stationXs[i]));
  return { contactsX, velocities: [...velocitiesMPerS] };
}

/** Which layer holds (x, elevation): index top down, or −1 in the air. */
export function layerIndexAt(model: LayeredModel, x: number, elevation: number): number {
  if (elevation > elevationAt(model.surface, x)) return -1;
  for (let m = model.layers.length - 1; m >= 1; m--) {
    const top = model.layers[m].top;
    if (top && elevationAt(top, x) >= elevation) return m;
  }
  return 0;
}

/** Velocity at a point below the ground, m/s; 0 in the air. */
export function velocityAt(model: LayeredModel, x: number, elevation: number): number {
  const m = layerIndexAt(model, x, elevation);
  return m < 0 ? 0 : layerVelocityAt(model.layers[m].velocity, x);
}

/**
 * Every problem with a model's shape and values; paths are JSON pointers below `base`
 * (e.g. "/model/layers/1/top/3/x"). Empty when the model can be gridded.
 */
export function checkModel(input: unknown, base = ''): Problem[] {
  const problems: Problem[] = [];
  const add = (path: string, code: string, message: string): void => {
    if (problems.length < 100) problems.push({ path: base + path, code, message });
  };
  if (!isObject(input)) {
    add('', 'model-not-object', 'The model must be an object with "surface" and "layers".');
    return problems;
  }
  checkPolyline(input.surface, '/surface', 'ground surface', add);
  const layers = input.layers;
  if (!Array.isArray(layers) || layers.length === 0) {
    add('/layers', 'layers-missing', 'The model needs a "layers" array with at least one layer, top down.');
    return problems;
  }
  if (layers.length > MODEL_LIMITS.maxLayers) {
    add('/layers', 'too-many-layers', `A model may have at most ${MODEL_LIMITS.maxLayers} layers, got ${layers.length}.`);
    return problems;
  }
  layers.forEach((layer: unknown, m: number) => {
    const path = `/layers/${m}`;
    if (!isObject(layer)) {
      add(path, 'layer-not-object', `Layer ${m} must be an object with a "velocity".`);
      return;
    }
    checkVelocity(layer.velocity, `${path}/velocity`, add);
    if (m === 0) {
      if (layer.top !== undefined) add(`${path}/top`, 'top-on-first-layer', 'The first layer\'s top is the ground surface; leave "top" out.');
    } else if (layer.top === undefined) {
      add(`${path}/top`, 'top-missing', `Layer ${m} needs a "top": the interface above it, as [{x, elevation}, …].`);
    } else {
      checkPolyline(layer.top, `${path}/top`, `top of layer ${m}`, add);
    }
  });
  return problems;
}

/**
 * The velocity grid of a model over a section (see the file comment for how cells are
 * filled). The grid covers [xMin, xMax] × [zMin, zMax], rounded outward to whole cells.
 * @throws ModelError for a model that fails checkModel; GridError for a bad extent or one
 *   above MAX_GRID_NODES nodes.
 */
export function buildVelocityGrid(model: LayeredModel, extent: GridExtent): VelocityGrid {
  const problems = checkModel(model);
  if (problems.length > 0) throw new ModelError(problems);
  const { xMin, xMax, zMin, zMax, cellM: h } = extent;
  for (const [field, value] of Object.entries(extent)) {
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      throw new GridError(field, `Grid ${field} must be a finite number of metres, got ${String(value)}.`);
    }
  }
  if (!(h > 0)) throw new GridError('cellM', `Cell size must be positive, got ${h} m.`);
  if (!(xMax > xMin)) throw new GridError('xMax', `Grid xMax (${xMax} m) must exceed xMin (${xMin} m).`);
  if (!(zMax > zMin)) throw new GridError('zMax', `Grid zMax (${zMax} m) must exceed zMin (${zMin} m).`);
  const nx = nodesAlong(xMax - xMin, h);
  const nz = nodesAlong(zMax - zMin, h);
  if (nx * nz > MAX_GRID_NODES) {
    throw new GridError(
      'cellM',
      `The section ${xMax - xMin} m × ${zMax - zMin} m at ${h} m cells needs ${nx} × ${nz} = ${nx * nz} nodes, above the limit of ${MAX_GRID_NODES}; use larger cells.`,
    );
  }
  checkGridSize(nx, nz, h);

  const cellsX = nx - 1;
  const cellsZ = nz - 1;
  const skinM = GROUND_SKIN_CELLS * h;
  const nLayers = model.layers.length;
  const slowness = new Float64Array(cellsX * cellsZ);
  const groundLength = new Float64Array(cellsZ);
  const minSlow = new Float64Array(cellsZ);
  const delaySum = new Float64Array(cellsZ);
  // Per strip and layer: the interval (bottom, top] the layer holds, and its slowness.
  const strips = CELL_SUBCOLUMNS;
  const bottoms = new Float64Array(strips * nLayers);
  const tops = new Float64Array(strips * nLayers);
  const slows = new Float64Array(strips * nLayers);
  const interfaceZ = new Float64Array(nLayers);

  for (let i = 0; i < cellsX; i++) {
    for (let q = 0; q < strips; q++) {
      const x = xMin + (i + (q + 0.5) / strips) * h;
      const surface = elevationAt(model.surface, x);
      const skinTop = surface + skinM;
      // An interface at or above the ground rises to the top of the skin, so the skin
      // takes the material found at the surface.
      interfaceZ[0] = skinTop;
      for (let m = 1; m < nLayers; m++) {
        const z = elevationAt(model.layers[m].top!, x);
        interfaceZ[m] = z >= surface ? skinTop : z;
      }
      // Layer m holds (max of deeper layers' tops, own top].
      let deeperTop = -Infinity;
      for (let m = nLayers - 1; m >= 0; m--) {
        const o = q * nLayers + m;
        bottoms[o] = deeperTop;
        tops[o] = interfaceZ[m];
        slows[o] = 1000 / layerVelocityAt(model.layers[m].velocity, x);
        if (interfaceZ[m] > deeperTop) deeperTop = interfaceZ[m];
      }
    }
    groundLength.fill(0);
    minSlow.fill(Infinity);
    delaySum.fill(0);
    // Pass 1: ground share and fastest material of each cell in this column.
    // Pass 2: Σ length·√(s² − s_min²), the vertical delay of a ray at the fastest slowness.
    for (let pass = 1; pass <= 2; pass++) {
      for (let o = 0; o < strips * nLayers; o++) {
        const top = tops[o];
        const bottom = bottoms[o];
        if (!(top > bottom)) continue;
        const s = slows[o];
        const jLo = Math.max(0, Math.floor((bottom - zMin) / h));
        const jHi = Math.min(cellsZ - 1, Math.floor((top - zMin) / h));
        for (let j = jLo; j <= jHi; j++) {
          const lo = zMin + j * h;
          const len = Math.min(top, lo + h) - Math.max(bottom, lo);
          if (!(len > 1e-12 * h)) continue;
          if (pass === 1) {
            groundLength[j] += len;
            if (s < minSlow[j]) minSlow[j] = s;
          } else {
            const sm = minSlow[j];
            delaySum[j] += len * Math.sqrt(Math.max(0, s * s - sm * sm));
          }
        }
      }
    }
    for (let j = 0; j < cellsZ; j++) {
      const g = groundLength[j];
      let s = Infinity;
      if (g > 1e-9 * h) {
        const delay = delaySum[j] / g;
        s = Math.sqrt(minSlow[j] * minSlow[j] + delay * delay);
      }
      slowness[j * cellsX + i] = s;
    }
  }
  return { nx, nz, xMin, zMin, cellM: h, cellSlownessMsPerM: slowness };
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}


type AddProblem = (path: string, code: string, message: string) => void;

function checkPolyline(input: unknown, path: string, what: string, add: AddProblem): void {
  if (!Array.isArray(input) || input.length === 0) {
    add(path, 'polyline-missing', `The ${what} must be a non-empty array of {x, elevation} vertices.`);
    return;
  }
  if (input.length > MODEL_LIMITS.maxVerticesPerPolyline) {
    add(path, 'polyline-too-long', `The ${what} has ${input.length} vertices; at most ${MODEL_LIMITS.maxVerticesPerPolyline} are allowed.`);
    return;
  }
  let previousX = -Infinity;
  input.forEach((p: unknown, k: number) => {
    const at = `${path}/${k}`;
    if (!isObject(p)) {
      add(at, 'vertex-not-object', `Vertex ${k} of the ${what} must be an object {x, elevation}.`);
      return;
    }
    for (const field of ['x', 'elevation'] as const) {
      const v = p[field];
      if (!isFiniteNumber(v) || Math.abs(v) > MODEL_LIMITS.maxCoordinateM) {
        add(`${at}/${field}`, 'vertex-bad-number', `Vertex ${k} of the ${what}: ${field} must be a number of metres within ±${MODEL_LIMITS.maxCoordinateM}, got ${JSON.stringify(v)}.`);
      }
    }
    if (isFiniteNumber(p.x)) {
      if (p.x < previousX) {
        add(`${at}/x`, 'vertices-not-in-order', `Vertices of the ${what} must run in order of x; vertex ${k} at x=${p.x} m comes after x=${previousX} m.`);
      }
      previousX = Math.max(previousX, p.x);
    }
  });
}

function checkVelocityValue(v: unknown, path: string, add: AddProblem): void {
  if (!isFiniteNumber(v) || v < MODEL_LIMITS.minVelocityMPerS || v > MODEL_LIMITS.maxVelocityMPerS) {
    add(path, 'velocity-out-of-range', `Velocity must be a number of m/s from ${MODEL_LIMITS.minVelocityMPerS} to ${MODEL_LIMITS.maxVelocityMPerS}, got ${JSON.stringify(v)}.`);
  }
}

function checkVelocity(v: unknown, path: string, add: AddProblem): void {
  if (!isObject(v)) {
    checkVelocityValue(v, path, add);
    return;
  }
  const { contactsX, velocities } = v;
  if (!Array.isArray(contactsX) || contactsX.length > MODEL_LIMITS.maxContactsPerLayer) {
    add(`${path}/contactsX`, 'contacts-bad', `"contactsX" must be an array of at most ${MODEL_LIMITS.maxContactsPerLayer} x positions (m) of lateral velocity contacts.`);
    return;
  }
  if (!Array.isArray(velocities) || velocities.length !== contactsX.length + 1) {
    add(`${path}/velocities`, 'velocities-count', `"velocities" must hold one more value than "contactsX" (${contactsX.length + 1}), one per segment from left to right.`);
    return;
  }
  contactsX.forEach((x: unknown, k: number) => {
    if (!isFiniteNumber(x) || Math.abs(x) > MODEL_LIMITS.maxCoordinateM) {
      add(`${path}/contactsX/${k}`, 'contact-bad-number', `Contact ${k} must be a number of metres, got ${JSON.stringify(x)}.`);
    } else if (k > 0 && isFiniteNumber(contactsX[k - 1]) && x <= (contactsX[k - 1] as number)) {
      add(`${path}/contactsX/${k}`, 'contacts-not-increasing', `Contacts must be strictly increasing in x; ${x} m follows ${contactsX[k - 1]} m.`);
    }
  });
  velocities.forEach((value: unknown, k: number) => checkVelocityValue(value, `${path}/velocities/${k}`, add));
}
