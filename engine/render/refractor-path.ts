/**
 * Profiles along the line (ground, refractors) as runs of points: a station whose value is
 * null breaks the run, so the drawing has a gap there instead of a line through zero.
 */
import type { Container, Element } from '@svgdotjs/svg.js';
import type { LinearScale } from './scale.js';
import { round3 } from './format.js';

export interface ProfilePoint {
  x: number;
  elevation: number;
}

/** Splits (x, value|null) items into runs of consecutive non-null, finite values. */
export function profileRuns<T>(items: readonly T[], xOf: (item: T) => number, elevationOf: (item: T) => number | null | undefined): ProfilePoint[][] {
  const runs: ProfilePoint[][] = [];
  let run: ProfilePoint[] = [];
  for (const item of items) {
    const elevation = elevationOf(item);
    if (elevation === null || elevation === undefined || !Number.isFinite(elevation)) {
      if (run.length > 0) runs.push(run);
      run = [];
    } else {
      run.push({ x: xOf(item), elevation });
    }
  }
  if (run.length > 0) runs.push(run);
  return runs;
}

/** "x,y x,y …" in plot units. */
export function pointsAttr(points: readonly ProfilePoint[], x: LinearScale, y: LinearScale): string {
  return points.map((p) => `${round3(x(p.x))},${round3(y(p.elevation))}`).join(' ');
}

export interface PathStyle {
  colour: string;
  widthMm: number;
  dash?: string;
  role: string;
}

/**
 * One polyline per run; a run of a single station (covered on its own) becomes a dot,
 * data-role "<role>-point", so it is still seen.
 */
export function refractorPath(parent: Container, runs: readonly ProfilePoint[][], x: LinearScale, y: LinearScale, style: PathStyle): Element[] {
  return runs.map((run) => {
    if (run.length === 1) {
      return parent
        .circle(round3(style.widthMm * 2.4))
        .attr({ cx: round3(x(run[0].x)), cy: round3(y(run[0].elevation)), fill: style.colour, 'data-role': `${style.role}-point`, 'data-x': run[0].x });
    }
    const line = parent.polyline(pointsAttr(run, x, y)).attr({
      fill: 'none',
      stroke: style.colour,
      'stroke-width': style.widthMm,
      'stroke-linejoin': 'round',
      'stroke-linecap': 'round',
      'data-role': style.role,
    });
    if (style.dash) line.attr('stroke-dasharray', style.dash);
    return line;
  });
}

/**
 * Elevation of a drawn profile at x by straight lines between its points (where to put a
 * marker on the drawing; not a new estimate). Null outside the runs.
 */
export function elevationOnProfile(runs: readonly ProfilePoint[][], xM: number): number | null {
  for (const run of runs) {
    for (let i = 0; i < run.length; i++) {
      const a = run[i];
      if (a.x === xM) return a.elevation;
      const b = run[i + 1];
      if (b && a.x < xM && xM < b.x) return a.elevation + ((b.elevation - a.elevation) * (xM - a.x)) / (b.x - a.x);
    }
  }
  return null;
}
