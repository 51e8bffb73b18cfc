/**
 * The first refractor of one line by each method (plus-minus, GRM, time terms) on one
 * section, for the geophysicist who cross-checks: above, the ground and the three
 * refractors, each in its own line style *and* colour (never colour alone), the plus-minus
 * refractor with its ±1σ band; below, each method's refractor elevation less the
 * plus-minus one, against the same band, with a marker where two methods differ by more
 * than their combined σ (compare/method-comparison.ts); under it the stretches where they
 * do, as a table; the cautions along the bottom as on every section. Draws what the
 * comparison holds and computes nothing but positions. O(methods · stations).
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Survey } from '../survey/survey.js';
import type { MethodName } from '../survey/survey.js';
import type { Station } from '../output/interpretation.js';
import { differsBeyondSigma, type MethodComparison, type MethodRun } from '../compare/method-comparison.js';
import { CAUTIONS } from '../qc/cautions.js';
import { createCanvas } from './svg-document.js';
import { PAGE, TEXT_MM } from './page.js';
import { INK, METHOD_STYLES, SECTION_COLOURS } from './palette.js';
import { titleBlock } from './title-block.js';
import { bottomAxis, leftAxis } from './axis.js';
import { linearScale, type LinearScale } from './scale.js';
import { fixed, formatMetres, formatMs, round3 } from './format.js';
import { addText } from './text.js';
import { legend, type LegendItem } from './legend.js';
import { cautionNote, cautionNoteHeightMm } from './caution-note.js';
import { describeMethod, lineName, surveyDateText } from './describe.js';

const PLOT_LEFT_MM = 30;
const PLOT_RIGHT_MM = PAGE.widthMm - PAGE.marginMm - 4;
/** Table rows shown; more stretches are counted in a last line. */
const TABLE_ROWS = 4;
const ROW_MM = TEXT_MM.tick * 1.45;

type Point = { x: number; y: number };

/** Runs of consecutive defined points (a null breaks the line). O(n). */
function runsOf(points: (Point | null)[]): Point[][] {
  const runs: Point[][] = [];
  let run: Point[] = [];
  for (const p of points) {
    if (p === null) {
      if (run.length > 0) runs.push(run);
      run = [];
    } else run.push(p);
  }
  if (run.length > 0) runs.push(run);
  return runs;
}

function pathOf(run: Point[], x: LinearScale, y: LinearScale): string {
  return run.map((p, i) => `${i === 0 ? 'M' : 'L'}${round3(x(p.x))} ${round3(y(p.y))}`).join(' ');
}

/** A method's line: its colour, width and dash pattern (palette.ts METHOD_STYLES). */
function methodLine(parent: Container, d: string, method: MethodName, role: string): void {
  const style = METHOD_STYLES[method];
  parent.path(d).attr({
    fill: 'none',
    stroke: style.colour,
    'stroke-width': style.widthMm,
    'stroke-linecap': 'round',
    'stroke-linejoin': 'round',
    ...(style.dash ? { 'stroke-dasharray': style.dash } : {}),
    'data-role': role,
    'data-method': method,
  });
}

/** Marker of a station where the method differs from plus-minus beyond the combined σ: a shape per method. */
function marker(parent: Container, method: MethodName, cx: number, cy: number): void {
  const style = METHOD_STYLES[method];
  const r = 0.9;
  const attrs = { fill: style.colour, stroke: INK.halo, 'stroke-width': 0.15, 'data-role': 'differs-marker', 'data-method': method };
  if (method === 'time-term') parent.circle(2 * r).center(round3(cx), round3(cy)).attr(attrs);
  else parent.rect(2 * r * 0.9, 2 * r * 0.9).center(round3(cx), round3(cy)).attr(attrs);
}

function extent(values: number[], minSpan: number): [number, number] {
  if (values.length === 0) return [0, 1];
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const pad = Math.max(minSpan / 2 - (hi - lo) / 2, 0.08 * (hi - lo));
  return [lo - pad, hi + pad];
}

const refractorElevation = (s: Station): number | null => (s.depth === null ? null : s.elevation - s.depth);

/** Ground elevation at x, linear between geophones, held beyond the ends. O(n). */
function groundAt(xs: readonly number[], ground: readonly number[], at: number): number {
  if (at <= xs[0]) return ground[0];
  for (let i = 1; i < xs.length; i++) if (at <= xs[i]) return ground[i - 1] + ((ground[i] - ground[i - 1]) * (at - xs[i - 1])) / (xs[i] - xs[i - 1]);
  return ground[ground.length - 1];
}

/** Legend: ground, each method (with why one did not run), the band, the marker. */
function legendItems(runs: readonly MethodRun[]): LegendItem[] {
  const items: LegendItem[] = [
    { label: 'ground', glyph: (g, cx, cy) => void g.line(round3(cx - 2.8), cy, round3(cx + 2.8), cy).attr({ stroke: SECTION_COLOURS.ground, 'stroke-width': 0.45 }) },
  ];
  for (const run of runs) {
    const style = METHOD_STYLES[run.method];
    items.push({
      label: run.ran ? `${describeMethod(run.method)} (${style.words})` : `${describeMethod(run.method)}: not run on this line (see its warnings)`,
      glyph: (g, cx, cy) => {
        if (!run.ran) return;
        methodLine(g, `M${round3(cx - 2.8)} ${round3(cy)} L${round3(cx + 2.8)} ${round3(cy)}`, run.method, 'legend-line');
      },
    });
  }
  items.push({
    label: 'shot (geophones: ticks)',
    glyph: (g, cx, cy) => void g.path(`M${round3(cx - 1)} ${round3(cy - 1)} L${round3(cx + 1)} ${round3(cy - 1)} L${round3(cx)} ${round3(cy + 0.7)} Z`).attr({ fill: SECTION_COLOURS.shot }),
  });
  items.push({
    label: '±1σ of the plus-minus depth',
    glyph: (g, cx, cy) => void g.rect(5.6, 2.4).move(round3(cx - 2.8), round3(cy - 1.2)).attr({ fill: METHOD_STYLES['plus-minus'].colour, 'fill-opacity': 0.14 }),
  });
  items.push({
    label: 'differs from plus-minus by more than the combined 1σ',
    glyph: (g, cx, cy) => {
      marker(g, 'grm', cx - 1.3, cy);
      marker(g, 'time-term', cx + 1.3, cy);
    },
  });
  return items;
}

/** The comparison as an SVG page (see the file comment). */
export function renderMethodComparison(survey: Survey, comparison: MethodComparison): string {
  const base = comparison.runs[0].interpretation;
  const name = lineName(survey, base);
  const canvas = createCanvas(`Refractor by each method — ${name}`);
  const svg = canvas.svg;
  const ran = comparison.runs.filter((r) => r.ran);
  const pm = comparison.runs.find((r) => r.method === 'plus-minus')!;
  const xs = survey.geophones.map((g) => g.x);
  const ground = survey.geophones.map((g) => g.elevation ?? 0);

  const tt = comparison.runs.find((r) => r.method === 'time-term' && r.ran)?.interpretation.timeTerm;
  const grm = comparison.runs.find((r) => r.method === 'grm' && r.ran)?.interpretation.grm;
  const notes = [
    {
      text: comparison.differences.length === 0 ? 'methods agree within 1σ everywhere' : `${comparison.differences.length} stretch${comparison.differences.length === 1 ? '' : 'es'} where methods differ beyond 1σ`,
      role: 'differences-count',
      alert: comparison.differences.length > 0,
    },
    ...(grm ? [{ text: `GRM optimum XY ${formatMetres(grm.optimumXy)}`, role: 'grm-optimum' }] : []),
    ...(tt ? [{ text: `time terms: RMS ${formatMs(tt.rmsMs)} over ${tt.picks} picks`, role: 'time-term-fit' }] : []),
  ];
  const ruleY = titleBlock(svg, {
    title: name,
    subtitle: ['Refractor by each method', `${survey.geophones.length} geophones`, `${survey.shots.length} shots`].join(' · '),
    dateLine: survey.date ? surveyDateText(survey.date) : undefined,
    notes,
  });

  const contentWidth = PAGE.widthMm - 2 * PAGE.marginMm;
  const legendY = ruleY + 4;
  const legendH = legend(svg, legendItems(comparison.runs), PAGE.marginMm, legendY, contentWidth);
  const cautionTop = PAGE.heightMm - PAGE.marginMm + 1 - cautionNoteHeightMm(CAUTIONS, contentWidth);
  const tableRows = Math.min(TABLE_ROWS, comparison.differences.length) + 1 + (comparison.differences.length > TABLE_ROWS ? 1 : 0);
  const tableTop = cautionTop - 2 - tableRows * ROW_MM - ROW_MM;

  // Two panels between the legend and the table: the section (about 2/3) and the differences.
  const axisRoom = TEXT_MM.tick * 1.05 + 1.2 + TEXT_MM.label * 1.6;
  const top1 = legendY + legendH + 2;
  const available = tableTop - top1 - 2 * axisRoom - 10;
  const h1 = available * 0.64;
  const h2 = available - h1;
  const top2 = top1 + h1 + axisRoom + 8;

  const x = linearScale([Math.min(...xs), Math.max(...xs)], [PLOT_LEFT_MM, PLOT_RIGHT_MM]);
  const elevations = [
    ...ground,
    ...ran.flatMap((r) => r.interpretation.stations.map(refractorElevation).filter((v): v is number => v !== null)),
    ...pm.interpretation.stations.flatMap((s) => (s.depth !== null && s.depthUncertainty != null ? [s.elevation - s.depth - s.depthUncertainty] : [])),
  ];
  const y1 = linearScale(extent(elevations, 4), [top1 + h1, top1]);
  bottomAxis(svg, x, { atMm: top1 + h1, title: 'distance along the line (m)', maxTicks: 14, role: 'x1', gridToMm: top1 });
  leftAxis(svg, y1, { atMm: PLOT_LEFT_MM, title: 'elevation (m)', maxTicks: 6, role: 'y1', gridToMm: PLOT_RIGHT_MM, titleXMm: PAGE.marginMm + 2.2 });
  const exaggeration = (y1.range[0] - y1.range[1]) / (y1.domain[1] - y1.domain[0]) / ((x.range[1] - x.range[0]) / (x.domain[1] - x.domain[0]));
  addText(svg, `Ground and first refractor (vertical exaggeration ${fixed(exaggeration, 1)}:1)`, PLOT_LEFT_MM, top1 - 1.2, { sizeMm: TEXT_MM.label, weight: 'bold', role: 'panel-title' });

  const section = svg.group().attr('data-role', 'methods-section');
  // The plus-minus band first (underneath), then the ground, then the refractors, plus-minus last (on top).
  for (const run of runsOf(pm.interpretation.stations.map((s) => (s.depth !== null && s.depthUncertainty != null ? { x: s.x, y: s.depthUncertainty } : null)))) {
    const upper = run.map((p) => ({ x: p.x, y: (refractorElevation(pm.interpretation.stations[xs.indexOf(p.x)]) as number) + p.y }));
    const lower = run.map((p) => ({ x: p.x, y: (refractorElevation(pm.interpretation.stations[xs.indexOf(p.x)]) as number) - p.y })).reverse();
    section.path(`${pathOf(upper, x, y1)} ${pathOf(lower, x, y1).replace(/^M/, 'L')} Z`).attr({ fill: METHOD_STYLES['plus-minus'].colour, 'fill-opacity': 0.14, stroke: 'none', 'data-role': 'pm-band' });
  }
  section.path(pathOf(xs.map((v, i) => ({ x: v, y: ground[i] })), x, y1)).attr({ fill: 'none', stroke: SECTION_COLOURS.ground, 'stroke-width': 0.45, 'data-role': 'ground' });
  // Geophones as ticks under the ground, shots as small triangles on it (colour and shape as on the section).
  xs.forEach((v, i) => void section.line(round3(x(v)), round3(y1(ground[i])), round3(x(v)), round3(y1(ground[i]) + 1)).attr({ stroke: SECTION_COLOURS.geophone, 'stroke-width': 0.25, 'data-role': 'geophone' }));
  for (const shot of survey.shots) {
    if (shot.x < x.domain[0] || shot.x > x.domain[1]) continue;
    const cx = x(shot.x);
    const cy = y1(shot.elevation ?? groundAt(xs, ground, shot.x));
    section.path(`M${round3(cx - 1)} ${round3(cy - 2)} L${round3(cx + 1)} ${round3(cy - 2)} L${round3(cx)} ${round3(cy - 0.3)} Z`).attr({ fill: SECTION_COLOURS.shot, 'data-role': 'shot' });
  }
  const drawOrder = [...ran.filter((r) => r.method !== 'plus-minus'), ...ran.filter((r) => r.method === 'plus-minus')];
  for (const run of drawOrder) {
    for (const part of runsOf(run.interpretation.stations.map((s) => { const e = refractorElevation(s); return e === null ? null : { x: s.x, y: e }; }))) {
      methodLine(section, pathOf(part, x, y1), run.method, 'method-refractor');
    }
  }

  // Differences from plus-minus, m of refractor elevation (positive: the other method's refractor higher).
  const others = ran.filter((r) => r.method !== 'plus-minus');
  const diffs = others.map((r) => ({
    run: r,
    points: r.interpretation.stations.map((s, i) => {
      const e = refractorElevation(s);
      const p = refractorElevation(pm.interpretation.stations[i]);
      return e === null || p === null ? null : { x: s.x, y: e - p };
    }),
  }));
  const bandValues = pm.interpretation.stations.flatMap((s) => (s.depthUncertainty != null && s.depth !== null ? [s.depthUncertainty, -s.depthUncertainty] : []));
  const y2 = linearScale(extent([0, ...bandValues, ...diffs.flatMap((d) => d.points.filter((p): p is Point => p !== null).map((p) => p.y))], 0.5), [top2 + h2, top2]);
  bottomAxis(svg, x, { atMm: top2 + h2, title: 'distance along the line (m)', maxTicks: 14, role: 'x2', gridToMm: top2 });
  leftAxis(svg, y2, { atMm: PLOT_LEFT_MM, title: 'less plus-minus (m)', maxTicks: 4, role: 'y2', gridToMm: PLOT_RIGHT_MM, titleXMm: PAGE.marginMm + 2.2 });
  addText(svg, 'Refractor elevation less the plus-minus refractor (above zero: shallower than plus-minus)', PLOT_LEFT_MM, top2 - 1.2, { sizeMm: TEXT_MM.label, weight: 'bold', role: 'panel-title' });
  const lower = svg.group().attr('data-role', 'methods-differences');
  for (const run of runsOf(pm.interpretation.stations.map((s) => (s.depth !== null && s.depthUncertainty != null ? { x: s.x, y: s.depthUncertainty } : null)))) {
    const back = run.map((p) => ({ x: p.x, y: -p.y })).reverse();
    lower.path(`${pathOf(run, x, y2)} ${pathOf(back, x, y2).replace(/^M/, 'L')} Z`).attr({ fill: METHOD_STYLES['plus-minus'].colour, 'fill-opacity': 0.14, stroke: 'none', 'data-role': 'pm-band' });
  }
  methodLine(lower, `M${round3(x(Math.min(...xs)))} ${round3(y2(0))} L${round3(x(Math.max(...xs)))} ${round3(y2(0))}`, 'plus-minus', 'zero-line');
  for (const d of diffs) {
    for (const part of runsOf(d.points)) methodLine(lower, pathOf(part, x, y2), d.run.method, 'method-difference');
    d.points.forEach((p, i) => {
      if (p !== null && differsBeyondSigma(pm.interpretation.stations[i], d.run.interpretation.stations[i])) marker(lower, d.run.method, x(p.x), y2(p.y));
    });
  }

  differenceTable(svg, comparison, tableTop);
  cautionNote(svg, CAUTIONS, PAGE.marginMm, cautionTop, contentWidth);
  return canvas.serialize();
}

/** The stretches where two methods differ beyond their combined σ, largest first. */
function differenceTable(parent: Container, comparison: MethodComparison, topMm: number): void {
  const group = parent.group().attr('data-role', 'differences-table');
  const left = PAGE.marginMm;
  let y = topMm + TEXT_MM.tick;
  // σa, σb rather than subscript digits: the export fonts (Liberation Sans) have no ₁ ₂, and the PDF and PNG would drop them.
  addText(group, 'Where the methods differ by more than their combined 1σ (√(σa² + σb²) of the two depths)', left, y, { sizeMm: TEXT_MM.label, weight: 'bold', role: 'table-title' });
  y += ROW_MM;
  if (comparison.differences.length === 0) {
    addText(group, 'Nowhere: at every station where two methods give a depth, they agree within their combined 1σ.', left, y, { sizeMm: TEXT_MM.tick, role: 'table-none' });
    return;
  }
  const columns = [0, 62, 92, 112, 170, 200];
  const header = ['methods', 'from – to', 'stations', 'largest |Δ depth|', 'at', 'deeper by'];
  header.forEach((h, k) => addText(group, h, left + columns[k], y, { sizeMm: TEXT_MM.tick, weight: 'bold', fill: INK.muted }));
  const rows = [...comparison.differences].sort((a, b) => b.largest / b.combinedSigma - a.largest / a.combinedSigma);
  for (const d of rows.slice(0, TABLE_ROWS)) {
    y += ROW_MM;
    const cells = [
      `${describeMethod(d.methods[0])} / ${describeMethod(d.methods[1])}`.replace(/ method/g, ''),
      d.from === d.to ? `${formatMetres(d.from)}` : `${formatMetres(d.from)} – ${formatMetres(d.to)}`,
      String(d.stations),
      // The ratio too: at the shown 0.1 m a difference just over its σ can print as the same number.
      `${formatMetres(d.largest)} = ${fixed(d.largest / d.combinedSigma, 1)}σ (1σ ${formatMetres(d.combinedSigma)})`,
      `x = ${formatMetres(d.atX)}`,
      describeMethod(d.deeperBy).replace(/ method/, ''),
    ];
    const row = group.group().attr('data-role', 'difference-row');
    cells.forEach((c, k) => addText(row, c, left + columns[k], y, { sizeMm: TEXT_MM.tick }));
  }
  if (rows.length > TABLE_ROWS) {
    y += ROW_MM;
    addText(group, `and ${rows.length - TABLE_ROWS} more (the page lists every one)`, left, y, { sizeMm: TEXT_MM.tick, fill: INK.muted, role: 'table-more' });
  }
}
