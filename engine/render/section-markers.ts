/**
 * The ground surface, the geophones on it and the shots above it, with shot names stacked
 * in rows so close shots (an end shot a metre off the first geophone) stay legible.
 */
import type { Container } from '@svgdotjs/svg.js';
import type { SectionFrame } from './section-frame.js';
import type { ProfilePoint } from './refractor-path.js';
import { pointsAttr } from './refractor-path.js';
import { round3 } from './format.js';
import { marker } from './markers.js';
import { SECTION_COLOURS } from './palette.js';
import { TEXT_MM, textWidthMm } from './page.js';
import { addText } from './text.js';

export const GEOPHONE_MM = 1.8;
export const SHOT_MM = 2.8;
/** Height of a shot star's centre above the ground, mm (clear of the geophone triangles). */
const SHOT_LIFT_MM = 4.2;

export function groundLine(parent: Container, ground: readonly ProfilePoint[], frame: SectionFrame): void {
  if (ground.length < 2) return;
  parent.polyline(pointsAttr(ground, frame.x, frame.elevation)).attr({
    fill: 'none',
    stroke: SECTION_COLOURS.ground,
    'stroke-width': 0.45,
    'stroke-linejoin': 'round',
    'data-role': 'ground',
  });
}

/** One downward triangle per geophone, tip on the ground. */
export function geophoneMarkers(parent: Container, geophones: readonly ProfilePoint[], frame: SectionFrame): void {
  const group = parent.group().attr('data-role', 'geophones');
  for (const g of geophones) {
    const cx = frame.x(g.x);
    const tipY = frame.elevation(g.elevation);
    marker(group, 'triangle-down', cx, tipY - GEOPHONE_MM * 0.5, GEOPHONE_MM, { colour: SECTION_COLOURS.geophone, strokeMm: 0.1 }).attr({
      'data-role': 'geophone',
      'data-x': g.x,
    });
  }
}

export interface ShotPlacement {
  id: string;
  x: number;
  elevation: number;
}

/** Stars above the ground with a short leader down to the shot point, names in rows. */
/** Names are kept inside `labelBounds` (x, mm) when given: a shot near a sheet's edge keeps its name on the sheet. */
export function shotMarkers(parent: Container, shots: readonly ShotPlacement[], frame: SectionFrame, labelBounds?: { x0: number; x1: number }): void {
  const group = parent.group().attr('data-role', 'shots');
  const rowsEnd: number[] = [];
  const order = shots.map((s, i) => ({ s, i })).sort((a, b) => a.s.x - b.s.x || a.i - b.i);
  for (const { s } of order) {
    const cx = frame.x(s.x);
    const groundY = frame.elevation(s.elevation);
    const starY = groundY - SHOT_LIFT_MM;
    const one = group.group().attr({ 'data-role': 'shot', 'data-x': s.x, 'data-shot': s.id });
    one.line(round3(cx), round3(starY), round3(cx), round3(groundY)).attr({ stroke: SECTION_COLOURS.shot, 'stroke-width': 0.3 });
    marker(one, 'star', cx, starY, SHOT_MM, { colour: SECTION_COLOURS.shot, strokeMm: 0.15 });
    const width = textWidthMm(s.id, TEXT_MM.label);
    const lx = labelBounds ? Math.min(Math.max(cx, labelBounds.x0 + width / 2 + 0.5), labelBounds.x1 - width / 2 - 0.5) : cx;
    let row = 0;
    while (row < rowsEnd.length && rowsEnd[row] > lx - width / 2 - 1) row++;
    rowsEnd[row] = lx + width / 2;
    const labelY = starY - SHOT_MM / 2 - 1 - row * TEXT_MM.label * 1.15;
    addText(one, s.id, lx, labelY, { sizeMm: TEXT_MM.label, anchor: 'middle', halo: true, role: 'shot-label' });
  }
}
