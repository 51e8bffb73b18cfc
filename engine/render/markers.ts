/**
 * Marker shapes for picks, geophones and shots, centred on (cx, cy), size = overall width, mm.
 */
import type { Container, Element } from '@svgdotjs/svg.js';
import { round3 } from './format.js';

export type MarkerShape =
  | 'circle'
  | 'square'
  | 'triangle-up'
  | 'diamond'
  | 'triangle-down'
  | 'triangle-right'
  | 'hourglass'
  | 'plus'
  | 'cross'
  | 'hexagon'
  | 'star';

/**
 * Ten shapes for shots on the time–distance plot, in order of use: outline families
 * alternate (round, pointed up, square, strokes, …) so neighbours in the list differ at a
 * glance at pick size, the last and the first too. The hexagon is left out: at 1.7 mm it
 * reads as a circle.
 */
export const SHOT_SHAPES: readonly MarkerShape[] = ['circle', 'triangle-up', 'square', 'cross', 'diamond', 'triangle-down', 'plus', 'star', 'hourglass', 'triangle-right'];

export interface MarkerStyle {
  colour: string;
  /** Outline only (white inside): used for phantomed arrivals. */
  hollow?: boolean;
  strokeMm?: number;
}

function polygonAround(cx: number, cy: number, points: [number, number][]): string {
  return points.map(([dx, dy]) => `${round3(cx + dx)},${round3(cy + dy)}`).join(' ');
}

export function marker(parent: Container, shape: MarkerShape, cx: number, cy: number, sizeMm: number, style: MarkerStyle): Element {
  const r = sizeMm / 2;
  const stroke = style.strokeMm ?? 0.25;
  const paint = style.hollow
    ? { fill: '#ffffff', stroke: style.colour, 'stroke-width': stroke }
    : { fill: style.colour, stroke: style.colour, 'stroke-width': stroke };
  switch (shape) {
    case 'circle':
      return parent.circle(round3(sizeMm * 0.9)).attr({ cx: round3(cx), cy: round3(cy), ...paint });
    case 'square': {
      const s = r * 0.82;
      return parent.polygon(polygonAround(cx, cy, [[-s, -s], [s, -s], [s, s], [-s, s]])).attr(paint);
    }
    case 'triangle-up':
      return parent.polygon(polygonAround(cx, cy, [[0, -r], [r, r * 0.75], [-r, r * 0.75]])).attr(paint);
    case 'triangle-down':
      return parent.polygon(polygonAround(cx, cy, [[-r, -r * 0.75], [r, -r * 0.75], [0, r]])).attr(paint);
    case 'triangle-right':
      return parent.polygon(polygonAround(cx, cy, [[-r * 0.75, -r], [r, 0], [-r * 0.75, r]])).attr(paint);
    case 'hourglass':
      // Two triangles tip to tip (a bow tie standing up).
      return parent.polygon(polygonAround(cx, cy, [[-r * 0.85, -r], [r * 0.85, -r], [-r * 0.85, r], [r * 0.85, r]])).attr(paint);
    case 'diamond':
      return parent.polygon(polygonAround(cx, cy, [[0, -r], [r, 0], [0, r], [-r, 0]])).attr(paint);
    case 'hexagon': {
      const pts: [number, number][] = [];
      for (let k = 0; k < 6; k++) pts.push([r * 0.95 * Math.cos((Math.PI / 3) * k), r * 0.95 * Math.sin((Math.PI / 3) * k)]);
      return parent.polygon(polygonAround(cx, cy, pts)).attr(paint);
    }
    case 'star': {
      const pts: [number, number][] = [];
      for (let k = 0; k < 10; k++) {
        const radius = k % 2 === 0 ? r : r * 0.45;
        const angle = -Math.PI / 2 + (Math.PI / 5) * k;
        pts.push([radius * Math.cos(angle), radius * Math.sin(angle)]);
      }
      return parent.polygon(polygonAround(cx, cy, pts)).attr(paint);
    }
    case 'plus':
    case 'cross': {
      // Strokes only; a hollow plus is drawn thinner so it still reads as different.
      const a = shape === 'plus' ? 0 : Math.PI / 4;
      const dx = r * Math.cos(a);
      const dy = r * Math.sin(a);
      const d = `M${round3(cx - dx)},${round3(cy - dy)}L${round3(cx + dx)},${round3(cy + dy)}M${round3(cx + dy)},${round3(cy - dx)}L${round3(cx - dy)},${round3(cy + dx)}`;
      return parent.path(d).attr({ fill: 'none', stroke: style.colour, 'stroke-width': style.hollow ? stroke : stroke * 2.4 });
    }
  }
}
