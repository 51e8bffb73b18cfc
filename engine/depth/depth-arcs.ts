/**
 * Vertical depths from normal depths: the refractor as the envelope of depth arcs.
 *
 * The plus-minus delay time at a geophone G gives its normal depth zG, the shortest
 * distance from G to the refractor, without saying in which direction (Hagedoorn,
 * Geophysical Prospecting 7, 1959: "the refractor is the envelope of the circles drawn
 * about the geophones"). Every point of the refractor is therefore at least zG from G, and
 * some point is exactly zG away: the refractor lies on or below every circle's lower arc
 *   y_G(x) = eG − sqrt(zG² − (x − xG)²),   |x − xG| ≤ zG,
 * and touches each. The deepest surface obeying "on or below every arc" while touching them
 * is the pointwise MINIMUM of the lower arcs (the lower envelope). Taking the maximum would
 * put the refractor inside arcs, nearer to a geophone than its normal depth — impossible.
 *
 * Evaluated only on the arcs, the envelope is scalloped: between the points where arcs
 * touch the true refractor it bulges up by about δ²/(2z) (δ the distance to the nearest
 * touching point). So the envelope here also includes the lower common tangent of each
 * pair of neighbouring arcs, from its tangent point on one arc to that on the next — the
 * straight line a draughtsman draws beneath two arcs — and, beyond the outermost touching
 * points, the outermost common tangents continued to the ends of the line. For a planar
 * refractor every common tangent is the plane itself, so the construction is exact (the
 * check in tests/engine/depth-arcs.test.ts); over a curved refractor it is the usual
 * chord approximation. Vertical depth under G = eG − envelope(xG).
 *
 * Units: metres. Works with ground elevations: each arc is centred on its geophone.
 */

export interface DepthArc {
  /** Geophone position along the line, m. */
  xM: number;
  /** Ground elevation at the geophone, m (centre of the arc). */
  elevationM: number;
  /** Normal depth (arc radius), m; null (or negative) = no arc at this geophone. */
  normalDepthM: number | null;
}

interface Circle {
  x: number;
  y: number;
  r: number;
}

/** A straight piece of the envelope: the line n·p = k between xFrom and xTo. */
interface TangentPiece {
  nx: number;
  ny: number;
  k: number;
  xFrom: number;
  xTo: number;
}

/** Elevation of an arc's lower half at x, m; null when x is outside the arc's reach. */
export function lowerArcElevationM(arc: DepthArc, xM: number): number | null {
  const r = arc.normalDepthM;
  if (r === null || !(r >= 0) || !Number.isFinite(r)) return null;
  const dx = xM - arc.xM;
  if (Math.abs(dx) > r) return null;
  return arc.elevationM - Math.sqrt(Math.max(0, r * r - dx * dx));
}

/**
 * Lower common tangent of two circles, with both circles above it; null when one circle
 * holds the other (|r2 − r1| > distance between centres: no common tangent).
 * Line n·p = k with n a unit vector pointing up toward the circles; tangent points c − r·n.
 */
function lowerCommonTangent(a: Circle, b: Circle): { nx: number; ny: number; k: number; xA: number; xB: number } | null {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const distance = Math.hypot(dx, dy);
  if (!(distance > 0)) return null;
  const cosOffset = (b.r - a.r) / distance; // n·(b − a) = rB − rA
  if (Math.abs(cosOffset) > 1) return null;
  const phi = Math.atan2(dy, dx);
  const beta = Math.acos(cosOffset);
  // The two tangent directions φ ± β; the lower common tangent has the upward normal.
  const nx1 = Math.cos(phi + beta);
  const ny1 = Math.sin(phi + beta);
  const nx2 = Math.cos(phi - beta);
  const ny2 = Math.sin(phi - beta);
  const first = ny1 >= ny2;
  const nx = first ? nx1 : nx2;
  const ny = first ? ny1 : ny2;
  if (!(ny > 0)) return null;
  const k = nx * a.x + ny * a.y - a.r;
  return { nx, ny, k, xA: a.x - a.r * nx, xB: b.x - b.r * nx };
}

function pieceElevation(piece: TangentPiece, xM: number): number | null {
  if (xM < piece.xFrom || xM > piece.xTo) return null;
  return (piece.k - piece.nx * xM) / piece.ny;
}

/** The straight pieces of the envelope: neighbour tangents and the two end continuations. */
function tangentPieces(circles: Circle[]): TangentPiece[] {
  const pieces: TangentPiece[] = [];
  const tangents = [];
  for (let i = 0; i + 1 < circles.length; i++) tangents.push(lowerCommonTangent(circles[i], circles[i + 1]));
  tangents.forEach((t) => {
    // Tangent points out of order mean the two arcs cross over each other (a sharp bend
    // or inconsistent depths): that tangent is not part of the envelope.
    if (t && t.xA <= t.xB) pieces.push({ nx: t.nx, ny: t.ny, k: t.k, xFrom: t.xA, xTo: t.xB });
  });
  const first = tangents[0];
  if (first) pieces.push({ nx: first.nx, ny: first.ny, k: first.k, xFrom: -Infinity, xTo: first.xA });
  const last = tangents[tangents.length - 1];
  if (last) pieces.push({ nx: last.nx, ny: last.ny, k: last.k, xFrom: last.xB, xTo: Infinity });
  return pieces;
}

function validCircles(arcs: DepthArc[]): Circle[] {
  return arcs
    .filter((a) => a.normalDepthM !== null && a.normalDepthM >= 0 && Number.isFinite(a.normalDepthM))
    .filter((a) => Number.isFinite(a.xM) && Number.isFinite(a.elevationM))
    .map((a) => ({ x: a.xM, y: a.elevationM, r: a.normalDepthM as number }))
    .sort((p, q) => p.x - q.x);
}

/**
 * Elevation of the refractor (the envelope of the arcs) at x, m; null where no arc and no
 * tangent piece reaches x.
 */
export function envelopeElevationM(arcs: DepthArc[], xM: number): number | null {
  const circles = validCircles(arcs);
  return envelopeAt(circles, tangentPieces(circles), xM);
}

/**
 * Elevation of the envelope of the arcs at each of several x, m (null where nothing
 * reaches): one set of circles and tangent pieces for all of them. Cost O(n log n + X·n)
 * for n arcs and X positions.
 */
export function envelopeElevationsM(arcs: DepthArc[], xsM: readonly number[]): (number | null)[] {
  const circles = validCircles(arcs);
  const pieces = tangentPieces(circles);
  return xsM.map((x) => envelopeAt(circles, pieces, x));
}

function envelopeAt(circles: Circle[], pieces: TangentPiece[], xM: number): number | null {
  let lowest: number | null = null;
  for (const c of circles) {
    // lowerArcElevationM's arithmetic on the circle itself (its radius is a valid depth),
    // without an arc object per circle and position: this runs n² times per section.
    const dx = xM - c.x;
    if (Math.abs(dx) > c.r) continue;
    const y = c.y - Math.sqrt(Math.max(0, c.r * c.r - dx * dx));
    if (lowest === null || y < lowest) lowest = y;
  }
  for (const p of pieces) {
    const y = pieceElevation(p, xM);
    if (y !== null && (lowest === null || y < lowest)) lowest = y;
  }
  return lowest;
}

/**
 * Vertical depth under each geophone, m: its ground elevation minus the envelope's
 * elevation at its x. Null where the geophone has no arc of its own (no coverage).
 */
export function verticalDepthsFromArcsM(arcs: DepthArc[]): (number | null)[] {
  const circles = validCircles(arcs);
  const pieces = tangentPieces(circles);
  return arcs.map((arc) => {
    const r = arc.normalDepthM;
    if (r === null || !(r >= 0) || !Number.isFinite(r)) return null;
    const refractor = envelopeAt(circles, pieces, arc.xM);
    return refractor === null ? null : arc.elevationM - refractor;
  });
}

/**
 * Where each geophone's arc touches the envelope (the foot of the perpendicular from the
 * geophone to the refractor), m: on the arc, in the mean direction of its tangent points
 * with its neighbours' lower common tangents; the arc's lowest point when it has no usable
 * tangent. Null where the geophone has no arc. Over a planar refractor every foot lies
 * exactly on the plane. Used to measure distance along the refractor (minus-time velocity
 * over a dipping refractor).
 */
export function arcFootPointsM(arcs: DepthArc[]): ({ xM: number; elevationM: number } | null)[] {
  const order = arcs
    .map((a, i) => ({ a, i }))
    .filter(({ a }) => a.normalDepthM !== null && a.normalDepthM >= 0 && Number.isFinite(a.normalDepthM))
    .filter(({ a }) => Number.isFinite(a.xM) && Number.isFinite(a.elevationM))
    .sort((p, q) => p.a.xM - q.a.xM);
  const circles: Circle[] = order.map(({ a }) => ({ x: a.xM, y: a.elevationM, r: a.normalDepthM as number }));
  // Sum of the upward unit normals of the common tangents each circle takes part in.
  const normals = circles.map(() => ({ nx: 0, ny: 0 }));
  for (let k = 0; k + 1 < circles.length; k++) {
    const t = lowerCommonTangent(circles[k], circles[k + 1]);
    if (!t || t.xA > t.xB) continue;
    normals[k].nx += t.nx;
    normals[k].ny += t.ny;
    normals[k + 1].nx += t.nx;
    normals[k + 1].ny += t.ny;
  }
  const feet: ({ xM: number; elevationM: number } | null)[] = arcs.map(() => null);
  order.forEach(({ i }, k) => {
    const c = circles[k];
    const length = Math.hypot(normals[k].nx, normals[k].ny);
    const nx = length > 0 ? normals[k].nx / length : 0;
    const ny = length > 0 ? normals[k].ny / length : 1;
    feet[i] = { xM: c.x - c.r * nx, elevationM: c.y - c.r * ny };
  });
  return feet;
}
