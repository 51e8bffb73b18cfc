/**
 * The regular 2-D grid the first-arrival solver works on.
 *
 * Coordinates: x is distance along the line (m, increasing to the right), z is ELEVATION
 * (m, increasing upward), the same datum as survey elevations. Travel times live on the
 * nodes, node (i, j) at x = xMin + i·cellM, z = zMin + j·cellM, index k = j·nx + i.
 * Slowness lives on the cells between nodes: cell (i, j) spans nodes i..i+1 and j..j+1,
 * index j·(nx − 1) + i, in ms per m (1000 / velocity in m/s), so times come out in ms.
 * A cell with infinite slowness is air: the solver never enters it.
 */
export interface VelocityGrid {
  /** Number of nodes along x. */
  nx: number;
  /** Number of nodes along z. */
  nz: number;
  /** x of node column 0, m. */
  xMin: number;
  /** Elevation of node row 0 (the bottom of the grid), m. */
  zMin: number;
  /** Node spacing, the same along x and z, m. */
  cellM: number;
  /** Slowness per cell, ms/m; Infinity marks air. Length (nx − 1)·(nz − 1). */
  cellSlownessMsPerM: Float64Array;
}

/**
 * Most nodes a grid may have. At 8 bytes of time, 8 of slowness and about 10 of solver
 * bookkeeping per node this keeps one solve near 100 MB, and a solve near a second.
 */
export const MAX_GRID_NODES = 4_000_000;

/** Fewest nodes along each axis: a grid needs at least one cell. */
export const MIN_NODES_PER_AXIS = 2;

/** Thrown for a grid that cannot be built or solved; the message names the field at fault. */
export class GridError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'GridError';
  }
}

/** Number of nodes along one axis for a span at a spacing: the span is covered, rounded up. */
export function nodesAlong(spanM: number, cellM: number): number {
  return Math.ceil(spanM / cellM - 1e-9) + 1;
}

/**
 * Checks a grid's size before anything is allocated.
 * @throws GridError when a count is below 2 or the node total exceeds MAX_GRID_NODES.
 */
export function checkGridSize(nx: number, nz: number, cellM: number): void {
  if (!(cellM > 0) || !Number.isFinite(cellM)) {
    throw new GridError('cellM', `Cell size must be a positive number of metres, got ${cellM}.`);
  }
  if (!Number.isInteger(nx) || nx < MIN_NODES_PER_AXIS) {
    throw new GridError('nx', `The grid needs at least ${MIN_NODES_PER_AXIS} nodes along x, got ${nx}.`);
  }
  if (!Number.isInteger(nz) || nz < MIN_NODES_PER_AXIS) {
    throw new GridError('nz', `The grid needs at least ${MIN_NODES_PER_AXIS} nodes along z, got ${nz}.`);
  }
  if (nx * nz > MAX_GRID_NODES) {
    throw new GridError(
      'cellM',
      `A grid of ${nx} × ${nz} = ${nx * nz} nodes exceeds the limit of ${MAX_GRID_NODES}; use larger cells or a smaller section.`,
    );
  }
}

/**
 * A grid from one velocity per cell (m/s; 0 or Infinity-slowness cells are air), e.g. for a
 * homogeneous medium in tests. `velocityAt(x, z)` is asked at each cell centre.
 */
export function gridFromVelocityFunction(
  extent: { xMin: number; zMin: number; nx: number; nz: number; cellM: number },
  velocityAt: (xM: number, zM: number) => number,
): VelocityGrid {
  const { xMin, zMin, nx, nz, cellM } = extent;
  checkGridSize(nx, nz, cellM);
  const cellsX = nx - 1;
  const cellsZ = nz - 1;
  const slowness = new Float64Array(cellsX * cellsZ);
  for (let j = 0; j < cellsZ; j++) {
    const zc = zMin + (j + 0.5) * cellM;
    for (let i = 0; i < cellsX; i++) {
      const v = velocityAt(xMin + (i + 0.5) * cellM, zc);
      slowness[j * cellsX + i] = v > 0 && Number.isFinite(v) ? 1000 / v : Infinity;
    }
  }
  return { nx, nz, xMin, zMin, cellM, cellSlownessMsPerM: slowness };
}
