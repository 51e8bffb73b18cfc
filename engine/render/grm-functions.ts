/**
 * The generalised reciprocal method's functions for every XY tried (Palmer, "The
 * generalized reciprocal method of seismic refraction interpretation", SEG, 1980): the
 * velocity-analysis function above, the time-depth function below, one line per XY, the
 * optimum heavy, so the geophysicist can judge the choice. Draws what `interpretation.grm`
 * reports and computes nothing but the display reduction: t_V is drawn reduced by
 * (x − x₀)/V' of the optimum (our choice: at the scale of the whole line t_V is a straight
 * rise and the differences between XYs, a few tenths of a ms, would not show), and each XY's
 * t_V shifted to zero mean (each carries the arbitrary constant of its pairs' datum).
 */
import type { Survey } from '../survey/survey.js';
import type { GrmXyFunctions, Interpretation } from '../output/interpretation.js';
import type { Container } from '@svgdotjs/svg.js';
import { createCanvas } from './svg-document.js';
import { PAGE, TEXT_MM } from './page.js';
import { GRM_COLOURS, INK } from './palette.js';
import { titleBlock } from './title-block.js';
import { bottomAxis, leftAxis } from './axis.js';
import { linearScale, type LinearScale } from './scale.js';
import { fixed, formatMetres, formatVelocity, round3 } from './format.js';
import { addText } from './text.js';
import { describeInterpretationMethod, lineName } from './describe.js';

const PLOT_LEFT_MM = 30;
const PLOT_RIGHT_MM = PAGE.widthMm - PAGE.marginMm - 22;

interface Series {
  xy: number;
  optimum: boolean;
  points: { x: number; y: number }[];
}

/** One XY's stations as (x, value) runs, value reduced as the file comment says. O(stations). */
function seriesOf(f: GrmXyFunctions, value: (s: GrmXyFunctions['stations'][number]) => number | null, optimumXy: number): Series {
  const points = f.stations.flatMap((s) => {
    const v = value(s);
    return v === null ? [] : [{ x: s.x, y: v }];
  });
  return { xy: f.xy, optimum: f.xy === optimumXy, points };
}

function extent(series: Series[], pick: (p: { x: number; y: number }) => number): [number, number] {
  const v = series.flatMap((s) => s.points.map(pick));
  if (v.length === 0) return [0, 1];
  const lo = Math.min(...v);
  const hi = Math.max(...v);
  const pad = Math.max(0.05, 0.08 * (hi - lo));
  return [lo - pad, hi + pad];
}

/** The lines of one panel, the optimum last (on top), each labelled with its XY at its right end. */
function panel(parent: Container, series: Series[], x: LinearScale, y: LinearScale, role: string): void {
  const g = parent.group().attr('data-role', role);
  const ordered = [...series.filter((s) => !s.optimum), ...series.filter((s) => s.optimum)];
  for (const s of ordered) {
    if (s.points.length < 2) continue;
    const d = s.points.map((p, i) => `${i === 0 ? 'M' : 'L'}${round3(x(p.x))} ${round3(y(p.y))}`).join(' ');
    g.path(d).attr({
      fill: 'none',
      stroke: s.optimum ? GRM_COLOURS.optimum : GRM_COLOURS.other,
      'stroke-width': s.optimum ? 0.6 : 0.2,
      'data-role': s.optimum ? 'xy-optimum' : 'xy-line',
      'data-xy': s.xy,
    });
  }
  // XY labels at the right ends: the optimum's first, then the others where they touch none placed (labels never overprint).
  const ends = ordered
    .filter((s) => s.points.length >= 2)
    .map((s) => ({ s, yMm: y(s.points[s.points.length - 1].y) }))
    .sort((a, b) => Number(b.s.optimum) - Number(a.s.optimum) || a.yMm - b.yMm);
  const placed: number[] = [];
  for (const e of ends) {
    if (placed.some((yMm) => Math.abs(yMm - e.yMm) < TEXT_MM.tick * 0.95)) continue;
    placed.push(e.yMm);
    addText(g, `XY ${formatMetres(e.s.xy)}`, PLOT_RIGHT_MM + 1, e.yMm + TEXT_MM.tick * 0.35, {
      sizeMm: TEXT_MM.tick,
      fill: e.s.optimum ? GRM_COLOURS.optimum : INK.muted,
      weight: e.s.optimum ? 'bold' : 'normal',
      role: 'xy-label',
    });
  }
}

/** The GRM functions as an SVG page; a page that says why when the line was not interpreted by GRM. */
export function renderGrmFunctions(survey: Survey, interpretation: Interpretation): string {
  const name = lineName(survey, interpretation);
  const canvas = createCanvas(`GRM functions — ${name}`);
  const svg = canvas.svg;
  const grm = interpretation.grm;
  const subtitle = ['GRM functions', describeInterpretationMethod(interpretation), `${survey.geophones.length} geophones`].filter((p) => p.length > 0).join(' · ');
  const notes = grm
    ? [
        { text: `optimum XY ${formatMetres(grm.optimumXy)}`, role: 'grm-optimum' },
        ...(grm.expectedOptimumXy !== null ? [{ text: `2·z·tan(ic) from plus-minus: ${formatMetres(grm.expectedOptimumXy)}`, role: 'grm-expected' }] : []),
        { text: 'optimum: t_V most nearly straight (Palmer 1980)', role: 'grm-criterion' },
      ]
    : [];
  const ruleY = titleBlock(svg, { title: name, subtitle, notes });
  if (!grm || grm.xyFunctions.length === 0) {
    addText(svg, 'This line was not interpreted by the generalised reciprocal method (options.method "grm"), so there are no XY functions to show.', PAGE.marginMm, ruleY + 12, {
      sizeMm: TEXT_MM.label,
      role: 'grm-none',
    });
    return canvas.serialize();
  }
  const best = grm.xyFunctions.find((f) => f.xy === grm.optimumXy) ?? grm.xyFunctions[0];
  const vRef = best.refractorVelocity;
  const xs = grm.xyFunctions.flatMap((f) => f.stations.map((s) => s.x));
  const x0 = Math.min(...xs);
  const reduce = (x: number): number => (vRef !== null && vRef > 0 ? (1000 * (x - x0)) / vRef : 0);
  const tv = grm.xyFunctions.map((f) => {
    const raw = seriesOf(f, (s) => (s.velocityAnalysis === null ? null : s.velocityAnalysis - reduce(s.x)), grm.optimumXy);
    const mean = raw.points.reduce((a, p) => a + p.y, 0) / Math.max(1, raw.points.length);
    return { ...raw, points: raw.points.map((p) => ({ x: p.x, y: p.y - mean })) };
  });
  const tg = grm.xyFunctions.map((f) => seriesOf(f, (s) => s.timeDepth, grm.optimumXy));

  const tableTop = PAGE.heightMm - PAGE.marginMm - 3 * TEXT_MM.tick * 1.4;
  const gap = 16;
  const h = (tableTop - 12 - (ruleY + 4) - gap) / 2;
  const top1 = ruleY + 4;
  const top2 = top1 + h + gap;
  const x = linearScale([Math.min(...xs), Math.max(...xs)], [PLOT_LEFT_MM, PLOT_RIGHT_MM]);
  const y1 = linearScale(extent(tv, (p) => p.y), [top1 + h, top1]);
  const y2 = linearScale(extent(tg, (p) => p.y), [top2 + h, top2]);
  bottomAxis(svg, x, { atMm: top1 + h, title: '', maxTicks: 14, role: 'x1', gridToMm: top1 });
  leftAxis(svg, y1, {
    atMm: PLOT_LEFT_MM,
    title: vRef !== null ? `t_V − x/${formatVelocity(vRef)} (ms)` : 't_V (ms)',
    maxTicks: 6,
    role: 'y1',
    gridToMm: PLOT_RIGHT_MM,
    titleXMm: PAGE.marginMm + 2.2,
  });
  bottomAxis(svg, x, { atMm: top2 + h, title: 'G, midway between X and Y, along the line (m)', maxTicks: 14, role: 'x2', gridToMm: top2 });
  leftAxis(svg, y2, { atMm: PLOT_LEFT_MM, title: 'time-depth t_G (ms)', maxTicks: 6, role: 'y2', gridToMm: PLOT_RIGHT_MM, titleXMm: PAGE.marginMm + 2.2 });
  addText(svg, 'Velocity-analysis function t_V = (t_AY − t_BX + t_AB)/2, reduced', PLOT_LEFT_MM, top1 - 1, { sizeMm: TEXT_MM.label, weight: 'bold', role: 'panel-title' });
  addText(svg, "Time-depth function t_G = (t_AY + t_BX − (t_AB + XY/V'))/2", PLOT_LEFT_MM, top2 - 1, { sizeMm: TEXT_MM.label, weight: 'bold', role: 'panel-title' });
  panel(svg, tv, x, y1, 'velocity-analysis');
  panel(svg, tg, x, y2, 'time-depth');

  // The measures per XY, the numbers the optimum was chosen by.
  const table = svg.group().attr('data-role', 'grm-table');
  const colW = Math.min(20, (PAGE.widthMm - 2 * PAGE.marginMm - 40) / grm.xyFunctions.length);
  const rows: [string, (f: GrmXyFunctions) => string][] = [
    ['XY', (f) => formatMetres(f.xy)],
    ["V'", (f) => (f.refractorVelocity === null ? '–' : formatVelocity(f.refractorVelocity))],
    // Hundredths of a ms, finer than the shown 0.1 ms: the XYs differ by that much and the choice rests on it.
    ['t_V off straight (ms)', (f) => (f.velocityRoughness === null ? '–' : fixed(f.velocityRoughness, 2))],
  ];
  rows.forEach(([label, cell], r) => {
    const yMm = tableTop + r * TEXT_MM.tick * 1.4 + TEXT_MM.tick;
    addText(table, label, PAGE.marginMm, yMm, { sizeMm: TEXT_MM.tick, weight: 'bold' });
    grm.xyFunctions.forEach((f, k) => {
      const opt = f.xy === grm.optimumXy;
      addText(table, cell(f), PAGE.marginMm + 40 + (k + 0.5) * colW, yMm, { sizeMm: TEXT_MM.tick * 0.9, anchor: 'middle', weight: opt ? 'bold' : 'normal', fill: opt ? GRM_COLOURS.optimum : INK.text });
    });
  });
  return canvas.serialize();
}
