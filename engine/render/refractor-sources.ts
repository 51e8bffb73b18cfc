/**
 * A refractor drawn so its stretches say how they were found: solid where opposing shots
 * both timed it (a plus time from a reciprocal pair), dashed where it rests on one side only
 * (a phantomed arrival or a shot's intercept time), dotted where it was interpolated between
 * stations, and not drawn where there is no coverage (the hatching says so). The ±1σ depth
 * uncertainty the interpretation gives per station is a band along the first refractor.
 * Read from the interpretation only: Station.delaySources, else Station.coverage. O(S).
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Station } from '../output/interpretation.js';
import type { SectionFrame } from './section-frame.js';
import type { ProfilePoint } from './refractor-path.js';
import { pointsAttr } from './refractor-path.js';
import { round3 } from './format.js';

export type RefractorSource = 'measured' | 'one-sided' | 'interpolated';

/** Dash patterns, mm: the same in the drawing and its legend. */
export const SOURCE_DASH: Readonly<Record<RefractorSource, string | undefined>> = {
  measured: undefined,
  'one-sided': '2.6 1.3',
  interpolated: '0.15 1.1',
};

const RANK: Readonly<Record<RefractorSource, number>> = { measured: 2, 'one-sided': 1, interpolated: 0 };

/** How a station's depth to refractor `index` (0 first) was found; null where it has none. */
export function stationSource(station: Station, index: number): RefractorSource | null {
  const depth = station.depths?.[index] ?? (index === 0 ? station.depth : null);
  if (depth === null || depth === undefined || !Number.isFinite(depth)) return null;
  const source = station.delaySources?.[index] ?? (index === 0 ? station.coverage : undefined);
  switch (source) {
    case 'phantom':
    case 'intercept':
      return 'one-sided';
    case 'interpolated':
      return 'interpolated';
    default:
      // 'pair', or an interpretation that does not say: drawn as found from both sides.
      return 'measured';
  }
}

export interface SourceRun {
  source: RefractorSource;
  points: ProfilePoint[];
}

/**
 * Consecutive covered stations as runs of one source. A stretch between two stations is as
 * good as the weaker of its ends; a station covered alone is a run of one point.
 */
export function sourceRuns(stations: readonly Station[], index: number, elevationOf: (s: Station) => number | null): SourceRun[] {
  const runs: SourceRun[] = [];
  let current: SourceRun | null = null;
  for (let i = 0; i < stations.length; i++) {
    const here = stations[i];
    const source = stationSource(here, index);
    const elevation = source === null ? null : elevationOf(here);
    if (source === null || elevation === null || !Number.isFinite(elevation)) {
      current = null;
      continue;
    }
    const point = { x: here.x, elevation };
    const before = i > 0 ? stations[i - 1] : null;
    const beforeSource = before ? stationSource(before, index) : null;
    const beforeElevation = before && beforeSource ? elevationOf(before) : null;
    if (current === null || beforeSource === null || beforeElevation === null || !Number.isFinite(beforeElevation)) {
      current = { source, points: [point] };
      runs.push(current);
      continue;
    }
    const stretch = RANK[source] < RANK[beforeSource] ? source : beforeSource;
    if (current.points.length === 1) current.source = stretch;
    if (stretch === current.source) {
      current.points.push(point);
    } else {
      current = { source: stretch, points: [current.points[current.points.length - 1], point] };
      runs.push(current);
    }
  }
  return runs;
}

/** Draws the runs; roles `<role>` (measured), `<role>-one-sided`, `<role>-interpolated`, `<role>-point`. */
export function drawSourceRuns(parent: Container, runs: readonly SourceRun[], frame: SectionFrame, style: { colour: string; widthMm: number; role: string }): void {
  for (const run of runs) {
    if (run.points.length === 1) {
      const p = run.points[0];
      parent.circle(round3(style.widthMm * 2.4)).attr({ cx: round3(frame.x(p.x)), cy: round3(frame.elevation(p.elevation)), fill: style.colour, 'data-role': `${style.role}-point`, 'data-x': p.x, 'data-source': run.source });
      continue;
    }
    const line = parent.polyline(pointsAttr(run.points, frame.x, frame.elevation)).attr({
      fill: 'none',
      stroke: style.colour,
      'stroke-width': style.widthMm,
      'stroke-linejoin': 'round',
      'stroke-linecap': run.source === 'interpolated' ? 'round' : 'butt',
      'data-role': run.source === 'measured' ? style.role : `${style.role}-${run.source}`,
      'data-source': run.source,
    });
    const dash = SOURCE_DASH[run.source];
    if (dash) line.attr('stroke-dasharray', dash);
  }
}

/** The uncertainty band: refractor elevation ± depthUncertainty per covered run, as one polygon per run. */
export function uncertaintyBand(parent: Container, stations: readonly Station[], frame: SectionFrame, colour: string): number {
  let drawn = 0;
  let run: Station[] = [];
  const flush = () => {
    if (run.length >= 2) {
      const upper = run.map((s) => ({ x: s.x, elevation: (s.refractorElevation as number) + (s.depthUncertainty as number) }));
      const lower = run.map((s) => ({ x: s.x, elevation: (s.refractorElevation as number) - (s.depthUncertainty as number) })).reverse();
      parent.polygon(pointsAttr([...upper, ...lower], frame.x, frame.elevation)).attr({ fill: colour, 'fill-opacity': 0.3, stroke: 'none', 'data-role': 'depth-uncertainty' });
      drawn++;
    }
    run = [];
  };
  for (const s of stations) {
    const ok = s.refractorElevation !== null && Number.isFinite(s.refractorElevation) && typeof s.depthUncertainty === 'number' && Number.isFinite(s.depthUncertainty) && s.depthUncertainty >= 0;
    if (ok) run.push(s);
    else flush();
  }
  flush();
  return drawn;
}

/** Smallest and largest ±1σ depth uncertainty the interpretation gives, m; null when it gives none. */
export function uncertaintyRange(stations: readonly Station[]): { min: number; max: number } | null {
  const values = stations.map((s) => s.depthUncertainty).filter((u): u is number => typeof u === 'number' && Number.isFinite(u) && u >= 0);
  if (values.length === 0) return null;
  return { min: Math.min(...values), max: Math.max(...values) };
}
