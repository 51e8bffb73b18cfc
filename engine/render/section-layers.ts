/**
 * The filled layers of the depth section, the "no coverage" hatching and the depth arcs.
 * Fills are drawn bottom layer last-over-first: the layer below a refractor is filled from
 * the refractor down to the foot of the plot, so deeper layers overlay shallower ones.
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Station } from '../output/interpretation.js';
import type { SectionFrame } from './section-frame.js';
import type { ProfilePoint } from './refractor-path.js';
import { pointsAttr } from './refractor-path.js';
import { round3 } from './format.js';
import { SECTION_COLOURS } from './palette.js';

/** Top layer: between the ground at each station and the refractor, per covered run. */
export function topLayerFill(parent: Container, runs: readonly ProfilePoint[][], stations: readonly Station[], frame: SectionFrame): void {
  const groundAt = new Map(stations.map((s) => [s.x, s.elevation]));
  for (const run of runs) {
    if (run.length < 2) continue;
    const ground = run.map((p) => ({ x: p.x, elevation: groundAt.get(p.x) ?? p.elevation }));
    const outline = [...ground, ...[...run].reverse()];
    parent.polygon(pointsAttr(outline, frame.x, frame.elevation)).attr({ fill: SECTION_COLOURS.layer1Fill, stroke: 'none', 'data-role': 'layer-fill', 'data-layer': 1 });
  }
}

/** A layer below a refractor: from the refractor down to the foot of the plot. */
export function lowerLayerFill(parent: Container, runs: readonly ProfilePoint[][], frame: SectionFrame, layerNumber: number, colour: string): void {
  const foot = frame.elevation.domain[0];
  for (const run of runs) {
    if (run.length < 2) continue;
    const outline = [...run, { x: run[run.length - 1].x, elevation: foot }, { x: run[0].x, elevation: foot }];
    parent.polygon(pointsAttr(outline, frame.x, frame.elevation)).attr({ fill: colour, stroke: 'none', 'data-role': 'layer-fill', 'data-layer': layerNumber });
  }
}

export interface UncoveredStretch {
  fromX: number;
  toX: number;
  /** Ground points from fromX to toX. */
  ground: ProfilePoint[];
}

/**
 * Stretches of stations with no refractor elevation, widened to the covered neighbours
 * (or half a station spacing past the spread's ends) so the hatch meets the fills.
 */
export function uncoveredStretches(stations: readonly Station[]): UncoveredStretch[] {
  const stretches: UncoveredStretch[] = [];
  let i = 0;
  while (i < stations.length) {
    if (stations[i].refractorElevation !== null && Number.isFinite(stations[i].refractorElevation)) {
      i++;
      continue;
    }
    let j = i;
    while (j + 1 < stations.length && (stations[j + 1].refractorElevation === null || !Number.isFinite(stations[j + 1].refractorElevation))) j++;
    const before = i > 0 ? stations[i - 1] : null;
    const after = j + 1 < stations.length ? stations[j + 1] : null;
    const spacing = stations.length > 1 ? (stations[stations.length - 1].x - stations[0].x) / (stations.length - 1) : 1;
    const ground: ProfilePoint[] = [];
    if (before) ground.push({ x: before.x, elevation: before.elevation });
    else ground.push({ x: stations[i].x - spacing / 2, elevation: stations[i].elevation });
    for (let k = i; k <= j; k++) ground.push({ x: stations[k].x, elevation: stations[k].elevation });
    if (after) ground.push({ x: after.x, elevation: after.elevation });
    else ground.push({ x: stations[j].x + spacing / 2, elevation: stations[j].elevation });
    stretches.push({ fromX: ground[0].x, toX: ground[ground.length - 1].x, ground });
    i = j + 1;
  }
  return stretches;
}

export const HATCH_ID = 'arcline-section-no-coverage';

/** The hatch pattern, defined once per drawing with a fixed id. */
export function defineHatch(svg: { pattern: Container['pattern'] } & Container): void {
  const pattern = svg.pattern(2.4, 2.4, (p) => {
    p.line(0, 2.4, 2.4, 0).attr({ stroke: SECTION_COLOURS.noCoverage, 'stroke-width': 0.25 });
  });
  pattern.id(HATCH_ID);
}

export function noCoverageHatch(parent: Container, stretch: UncoveredStretch, frame: SectionFrame): { cx: number; cy: number; widthMm: number } {
  const foot = frame.elevation.domain[0];
  const outline = [...stretch.ground, { x: stretch.toX, elevation: foot }, { x: stretch.fromX, elevation: foot }];
  parent
    .polygon(pointsAttr(outline, frame.x, frame.elevation))
    .attr({ fill: `url(#${HATCH_ID})`, stroke: 'none', 'data-role': 'no-coverage', 'data-from': stretch.fromX, 'data-to': stretch.toX });
  const x0 = frame.x(stretch.fromX);
  const x1 = frame.x(stretch.toX);
  const groundY = Math.max(...stretch.ground.map((p) => frame.elevation(p.elevation)));
  return { cx: (x0 + x1) / 2, cy: (groundY + frame.plot.y1) / 2, widthMm: x1 - x0 };
}

export const CLIP_ID = 'arcline-section-plot-clip';

/** Half-width of the arc drawn, degrees either side of straight down (true, unexaggerated angle). */
export const ARC_HALF_ANGLE_DEG = 50;

/**
 * Depth arcs: the bottom of a circle of radius normalDepth about each geophone (±50° from
 * straight down, where the envelope touches for any sensible dip), drawn as an ellipse
 * because the section is vertically exaggerated. The refractor is the line these arcs
 * envelope; the upper parts would only clutter the top layer.
 */
export function depthArcs(parent: Container, stations: readonly Station[], frame: SectionFrame): number {
  const group = parent.group().attr({ 'data-role': 'depth-arcs', 'clip-path': `url(#${CLIP_ID})` });
  let count = 0;
  for (const s of stations) {
    const r = s.normalDepth;
    if (r === null || r === undefined || !(r > 0) || !Number.isFinite(r)) continue;
    const cx = frame.x(s.x);
    const cy = frame.elevation(s.elevation);
    const rx = round3(Math.abs(r * frame.x.plotPerUnit));
    const ry = round3(Math.abs(r * frame.elevation.plotPerUnit));
    const phi = (ARC_HALF_ANGLE_DEG * Math.PI) / 180;
    const dx = round3(rx * Math.sin(phi));
    const dy = round3(ry * Math.cos(phi));
    // From the left end to the right end the short way round, through the bottom (sweep 0 in SVG's y-down frame).
    group
      .path(`M${round3(cx - dx)},${round3(cy + dy)}A${rx},${ry} 0 0 0 ${round3(cx + dx)},${round3(cy + dy)}`)
      .attr({ fill: 'none', stroke: SECTION_COLOURS.arc, 'stroke-width': 0.18, 'data-role': 'depth-arc', 'data-x': s.x });
    count++;
  }
  return count;
}
