/**
 * The time–distance plot: every shot's first-break picks against distance along the line,
 * time increasing upward (the trade's convention for T–X plots), with the branches the
 * interpretation fitted, crossover points, reciprocal times and their misfit, phantomed
 * arrivals and the first arrivals modelled through the section. It draws the fitted
 * lines the interpretation reports — t = interceptMs + 1000·|x − shotX| / velocity over
 * fromX..toX (BranchLine in engine/interpretation.ts) — and fits nothing itself.
 */
import { resolveOptions } from '../survey/options.js';
import type { Survey } from '../survey/survey.js';
import type { BranchLine, Interpretation, ReciprocalCheck, ShotAnalysis } from '../output/interpretation.js';
import { timeOnBranchMs } from '../branches/branch-line.js';
import { CAUTIONS } from '../qc/cautions.js';
import { createCanvas } from './svg-document.js';
import { PAGE, TEXT_MM, textWidthMm } from './page.js';
import { INK, SHOT_COLOURS } from './palette.js';
import { REMARK_MM, titleBlock, titleLeftWidthMm } from './title-block.js';
import { warningSummary } from './warning-summary.js';
import { cautionNote, cautionNoteHeightMm } from './caution-note.js';
import { legend, legendHeightMm, type LegendItem } from './legend.js';
import { bottomAxis, leftAxis } from './axis.js';
import { linearScale, type LinearScale } from './scale.js';
import { niceStep } from './ticks.js';
import { LabelPlacer, type Box } from './label-placer.js';
import { marker, SHOT_SHAPES, type MarkerShape } from './markers.js';
import { formatMs, formatVelocity, round3 } from './format.js';
import { addText, wrapText } from './text.js';
import { describeInterpretationMethod, lineName, qcSummary, surveyDateText } from './describe.js';
import type { Container } from '@svgdotjs/svg.js';

export interface TravelTimeOptions {
  /** Draw the modelled first arrivals where the interpretation has them (default true). */
  showModelled?: boolean;
}

interface ShotStyle {
  colour: string;
  shape: MarkerShape;
}

/**
 * The k-th shot along the line gets colour k mod 7 and shape k mod 10 (palette.ts,
 * markers.ts): 7 and 10 are coprime, so 70 shots get distinct pairs, and shots next to
 * each other on the line differ in both colour and shape.
 */
export function shotStyle(rank: number): ShotStyle {
  return { colour: SHOT_COLOURS[rank % SHOT_COLOURS.length], shape: SHOT_SHAPES[rank % SHOT_SHAPES.length] };
}

/** Number of shots that get a colour and shape no other shot has. */
export const DISTINCT_SHOT_STYLES = SHOT_COLOURS.length * SHOT_SHAPES.length;

/**
 * Each shot's rank along the line (by x, ties in survey order), the order in which styles
 * and legend entries are given. O(s log s).
 */
export function shotOrder(survey: Survey): { id: string; index: number; rank: number }[] {
  return survey.shots
    .map((shot, index) => ({ id: shot.id, index, x: shot.x }))
    .sort((a, b) => a.x - b.x || a.index - b.index)
    .map((o, rank) => ({ id: o.id, index: o.index, rank }));
}

const PICK_MM = 1.7;
/**
 * Closest that two of a shot's full pick markers are drawn, mm. Where geophones lie closer
 * on paper (a long line: 240 geophones at 5 m put them 1.1 mm apart and merged every shot's
 * markers into a solid band), each shot carries its marker on every k-th pick only, and a
 * dot of its colour and shape at the picks between (staggered from shot to shot), so every
 * pick is still drawn and the shots are still told apart by colour and shape.
 */
const MARKER_PITCH_MM = 3.4;
/** A marker pitch below this many marker sizes is too dense for a marker at every pick. */
const DENSE_PITCH_FACTOR = 1.6;
/** Size of the dot drawn at the picks between full markers, mm. */
const PICK_DOT_MM = 0.6;

/** Picks per full marker for a geophone spacing on paper, mm: 1 where markers do not crowd. */
export function picksPerMarker(spacingMm: number): number {
  if (!(spacingMm > 0) || spacingMm >= DENSE_PITCH_FACTOR * PICK_MM) return 1;
  return Math.ceil(MARKER_PITCH_MM / spacingMm);
}
/**
 * A velocity or passing-check label may cover at most this fraction of its box with picks
 * and brackets; on a dense plot (40 shots) it is left out rather than hide the picks it
 * names. Our choice, from the rendered 10- and 40-shot lines. A failed check's label has
 * no such limit.
 */
const MAX_PICK_COVER = 0.3;
const PLOT_LEFT_MM = 22;
const CLIP_ID = 'arcline-traveltimes-plot-clip';

interface Plot {
  x: LinearScale;
  t: LinearScale;
  box: Box;
}

/** Time on a fitted branch at x, ms (the BranchLine's own formula). */
function branchTimeMs(line: BranchLine, shotX: number, x: number): number {
  return timeOnBranchMs(line, Math.abs(x - shotX));
}

function finite(values: readonly (number | null | undefined)[]): number[] {
  return values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
}

export function renderTravelTimes(survey: Survey, interpretation: Interpretation, options: TravelTimeOptions = {}): string {
  const name = lineName(survey, interpretation);
  const canvas = createCanvas(`Time–distance plot — ${name}`);
  const svg = canvas.svg;
  const analyses = new Map((interpretation.shots ?? []).map((a) => [a.id, a]));
  const geophoneX = survey.geophones.map((g) => g.x);
  const showModelled = options.showModelled !== false;

  // Extent of everything drawn.
  const xs = [...geophoneX, ...survey.shots.map((s) => s.x)];
  const times: number[] = [];
  for (const shot of survey.shots) {
    times.push(...finite(shot.times));
    const a = analyses.get(shot.id);
    if (a?.phantom) times.push(...finite(a.phantom.times));
    if (showModelled && a?.modelledMs) times.push(...finite(a.modelledMs));
    for (const side of [a?.left, a?.right]) {
      for (const line of side ? [side.direct, ...side.refracted] : []) {
        if (line && (line.velocity === null || line.velocity > 0)) times.push(branchTimeMs(line, a!.x, line.fromX), branchTimeMs(line, a!.x, line.toX));
      }
    }
  }
  for (const r of interpretation.qc?.reciprocal ?? []) times.push(...finite([r.forwardMs, r.reverseMs]));
  const xMin = xs.length > 0 ? Math.min(...xs) : 0;
  const xMax = xs.length > 0 ? Math.max(...xs) : 1;
  const xPad = Math.max(0.5, 0.025 * (xMax - xMin));
  const tMaxData = times.length > 0 ? Math.max(...times) : 10;
  const tStep = niceStep(Math.max(1, tMaxData * 1.06), 8);
  const tMax = Math.max(tStep, Math.ceil((tMaxData * 1.06) / tStep) * tStep);

  // Layout.
  const contentWidth = PAGE.widthMm - 2 * PAGE.marginMm;
  const cautions = interpretation.cautions && interpretation.cautions.length > 0 ? interpretation.cautions : CAUTIONS;
  const paperSpacingMm = (medianGap(survey.geophones.map((g) => g.x)) * (PAGE.widthMm - PAGE.marginMm - PLOT_LEFT_MM)) / (xMax - xMin + 2 * xPad);
  const every = picksPerMarker(paperSpacingMm);
  const legendItems = travelTimeLegend(survey, interpretation, analyses, showModelled, every);
  const cautionTop = PAGE.heightMm - PAGE.marginMm + 1 - cautionNoteHeightMm(cautions, contentWidth);
  const legendTop = cautionTop - 2 - legendHeightMm(legendItems, contentWidth);
  const plotBottom = legendTop - 11;
  const reciprocalNotes = reciprocalSummary(interpretation, survey);
  const subtitle = ['Time–distance plot', describeInterpretationMethod(interpretation), `${survey.geophones.length} geophones`, `${survey.shots.length} shots`]
    .filter((part) => part.length > 0)
    .join(' · ');
  const notes = [...qcSummary(interpretation), ...reciprocalNotes];
  // Every warning in words under the title, as on the section (never a bare "1 warning").
  const remarks = wrapText(warningSummary(interpretation.qc?.warnings ?? [], { onSection: false }), titleLeftWidthMm({ notes }), REMARK_MM).map((text) => ({ text, role: 'warning-summary' }));
  const ruleY = titleBlock(svg, { title: name, subtitle, dateLine: survey.date === undefined ? undefined : surveyDateText(survey.date), notes, remarks });
  const box: Box = { x0: PLOT_LEFT_MM, y0: ruleY + 4, x1: PAGE.widthMm - PAGE.marginMm, y1: plotBottom };
  const plot: Plot = {
    x: linearScale([xMin - xPad, xMax + xPad], [box.x0, box.x1]),
    t: linearScale([0, tMax], [box.y1, box.y0]),
    box,
  };

  const clip = svg.clip();
  clip.id(CLIP_ID);
  clip.rect(round3(box.x1 - box.x0), round3(box.y1 - box.y0)).attr({ x: round3(box.x0), y: round3(box.y0) });
  bottomAxis(svg, plot.x, { atMm: box.y1, title: 'distance along line (m)', maxTicks: 14, role: 'x', gridToMm: box.y0 });
  leftAxis(svg, plot.t, { atMm: box.x0, title: 'time (ms)', maxTicks: 8, role: 'y', gridToMm: box.x1, titleXMm: PAGE.marginMm + 2.2 });

  const layer = svg.group().attr({ 'data-role': 'traveltime-plot', 'clip-path': `url(#${CLIP_ID})` });
  const modelledLayer = layer.group().attr('data-role', 'modelled-arrivals');
  const branchLayer = layer.group().attr('data-role', 'branches');
  const phantomLayer = layer.group().attr('data-role', 'phantoms');
  const pickLayer = layer.group().attr('data-role', 'picks');
  const markLayer = layer.group().attr('data-role', 'marks');
  const labelLayer = svg.group().attr('data-role', 'labels');
  const placer = new LabelPlacer();
  const rankOf = new Map(shotOrder(survey).map((o) => [o.index, o.rank]));
  const tally: LabelTally = { branch: { shown: 0, total: 0 }, reciprocal: { shown: 0, total: 0 } };

  // Picks first claim their place, so no label covers one.
  survey.shots.forEach((shot) => {
    shot.times.forEach((time, i) => {
      if (time === null || !Number.isFinite(time) || i >= geophoneX.length) return;
      const cx = plot.x(geophoneX[i]);
      const cy = plot.t(time);
      placer.reserve({ x0: cx - PICK_MM / 2, y0: cy - PICK_MM / 2, x1: cx + PICK_MM / 2, y1: cy + PICK_MM / 2 });
    });
  });
  // Labels in order of importance, each dropped rather than overprinting another: failed
  // reciprocal checks, then refracted and direct branch velocities, then the passing checks.
  const checks = reciprocalOrder(interpretation, survey);
  reciprocalMarks(markLayer, labelLayer, checks.filter((c) => !c.ok), survey, plot, placer, tally);
  for (const kind of ['refracted', 'direct'] as const) {
    survey.shots.forEach((shot, index) => {
      const a = analyses.get(shot.id);
      if (a) branchLines(branchLayer, labelLayer, a, plot, shotStyle(rankOf.get(index) ?? index), placer, kind, tally);
    });
  }
  reciprocalMarks(markLayer, labelLayer, checks.filter((c) => c.ok), survey, plot, placer, tally);

  survey.shots.forEach((shot, index) => {
    const style = shotStyle(rankOf.get(index) ?? index);
    const a = analyses.get(shot.id);
    if (a && showModelled && a.modelledMs) modelledLines(modelledLayer, shot.id, a.modelledMs, geophoneX, plot, style);
    if (a?.phantom) phantomArrivals(phantomLayer, shot.id, a.phantom.times, geophoneX, plot, style, a.phantom.fromShot);
    const picks = pickLayer.group().attr({ 'data-role': 'shot-picks', 'data-shot': shot.id });
    const rank = rankOf.get(index) ?? index;
    shot.times.forEach((time, i) => {
      if (time === null || !Number.isFinite(time) || i >= geophoneX.length) return;
      const full = every === 1 || (i + rank) % every === 0;
      marker(picks, style.shape, plot.x(geophoneX[i]), plot.t(time), full ? PICK_MM : PICK_DOT_MM, { colour: style.colour, strokeMm: full ? 0.2 : 0.15 }).attr({
        'data-mark': full ? 'marker' : 'dot',
        'data-role': 'pick',
        'data-shot': shot.id,
        'data-shape': style.shape,
        'data-x': geophoneX[i],
        'data-time': time,
      });
    });
    if (a) crossoverMarks(markLayer, a, plot);
    // The shot's own position on the time axis (t = 0), so off-end shots are seen.
    marker(markLayer, style.shape, plot.x(shot.x), plot.t(0) - 1.4, 2.2, { colour: style.colour, strokeMm: 0.25 }).attr({
      'data-role': 'shot-position',
      'data-shot': shot.id,
      'data-shape': style.shape,
      'data-x': shot.x,
    });
  });

  svg.rect(round3(box.x1 - box.x0), round3(box.y1 - box.y0)).attr({ x: round3(box.x0), y: round3(box.y0), fill: 'none', stroke: INK.frame, 'stroke-width': 0.3, 'data-role': 'plot-frame' });
  labelNote(svg, tally, box);
  legend(svg, legendItems, PAGE.marginMm, legendTop + 2, contentWidth);
  cautionNote(svg, cautions, PAGE.marginMm, cautionTop, contentWidth);
  return canvas.serialize();
}

function polylineRuns(xs: readonly number[], values: readonly (number | null)[]): [number, number][][] {
  const runs: [number, number][][] = [];
  let run: [number, number][] = [];
  values.forEach((v, i) => {
    if (v === null || !Number.isFinite(v) || i >= xs.length) {
      if (run.length > 0) runs.push(run);
      run = [];
    } else {
      run.push([xs[i], v]);
    }
  });
  if (run.length > 0) runs.push(run);
  return runs;
}

function toPoints(run: [number, number][], plot: Plot): string {
  return run.map(([x, t]) => `${round3(plot.x(x))},${round3(plot.t(t))}`).join(' ');
}

function modelledLines(parent: Container, shotId: string, modelled: readonly (number | null)[], xs: readonly number[], plot: Plot, style: ShotStyle): void {
  for (const run of polylineRuns(xs, modelled)) {
    if (run.length < 2) continue;
    parent.polyline(toPoints(run, plot)).attr({ fill: 'none', stroke: style.colour, 'stroke-width': 0.2, 'stroke-opacity': 0.75, 'stroke-dasharray': '0.4 0.6', 'data-role': 'modelled', 'data-shot': shotId });
  }
}

function phantomArrivals(parent: Container, shotId: string, times: readonly (number | null)[], xs: readonly number[], plot: Plot, style: ShotStyle, fromShot: string): void {
  const group = parent.group().attr({ 'data-role': 'shot-phantoms', 'data-shot': shotId, 'data-from-shot': fromShot });
  for (const run of polylineRuns(xs, times)) {
    if (run.length >= 2) {
      group.polyline(toPoints(run, plot)).attr({ fill: 'none', stroke: style.colour, 'stroke-width': 0.25, 'stroke-dasharray': '1.2 0.8', 'data-role': 'phantom-line' });
    }
    for (const [x, t] of run) {
      marker(group, style.shape, plot.x(x), plot.t(t), PICK_MM, { colour: style.colour, hollow: true, strokeMm: 0.22 }).attr({ 'data-role': 'phantom', 'data-x': x, 'data-time': t });
    }
  }
}

function rotatedBox(cx: number, cy: number, w: number, h: number, angleRad: number): Box {
  const hx = (Math.abs(Math.cos(angleRad)) * w) / 2 + (Math.abs(Math.sin(angleRad)) * h) / 2;
  const hy = (Math.abs(Math.sin(angleRad)) * w) / 2 + (Math.abs(Math.cos(angleRad)) * h) / 2;
  return { x0: cx - hx, y0: cy - hy, x1: cx + hx, y1: cy + hy };
}

/** How many labels of each kind were written, of how many (the rest found no free place). */
interface LabelTally {
  branch: { shown: number; total: number };
  reciprocal: { shown: number; total: number };
}

/**
 * One shot's fitted branches of one kind, each with its apparent velocity written beside it
 * where a place free of other labels is found (else the label is left out and counted).
 */
function branchLines(parent: Container, labels: Container, a: ShotAnalysis, plot: Plot, style: ShotStyle, placer: LabelPlacer, only: 'direct' | 'refracted', tally: LabelTally): void {
  for (const side of [a.left, a.right]) {
    if (!side) continue;
    const lines: { line: BranchLine; kind: 'direct' | 'refracted'; order: number }[] = [];
    if (side.direct && only === 'direct') lines.push({ line: side.direct, kind: 'direct', order: 0 });
    if (only === 'refracted') side.refracted.forEach((line, k) => lines.push({ line, kind: 'refracted', order: k + 1 }));
    for (const { line, kind, order } of lines) {
      // A level branch (velocity null) is drawn, unlabelled: its apparent velocity has no number.
      if (!(line.velocity === null || line.velocity > 0) || !Number.isFinite(line.fromX) || !Number.isFinite(line.toX)) continue;
      const x0m = Math.min(line.fromX, line.toX);
      const x1m = Math.max(line.fromX, line.toX);
      const p0 = { x: plot.x(x0m), y: plot.t(branchTimeMs(line, a.x, x0m)) };
      const p1 = { x: plot.x(x1m), y: plot.t(branchTimeMs(line, a.x, x1m)) };
      parent.line(round3(p0.x), round3(p0.y), round3(p1.x), round3(p1.y)).attr({
        stroke: style.colour,
        'stroke-width': kind === 'direct' ? 0.3 : 0.45,
        'stroke-linecap': 'round',
        'data-role': 'branch',
        'data-shot': a.id,
        'data-side': side.side,
        'data-kind': kind,
        'data-order': order,
        'data-velocity': line.velocity ?? 'level',
      });
      if (line.velocity === null) continue;
      const text = formatVelocity(line.velocity);
      const angle = Math.atan2(p1.y - p0.y, p1.x - p0.x);
      const size = TEXT_MM.label * 0.9;
      const w = textWidthMm(text, size);
      const h = size * 1.05;
      const candidates: { cx: number; cy: number }[] = [];
      for (const f of [0.5, 0.35, 0.65, 0.2, 0.8, 0.1, 0.9]) {
        for (const sign of [1, -1]) {
          const px = p0.x + f * (p1.x - p0.x);
          const py = p0.y + f * (p1.y - p0.y);
          const off = sign * (h / 2 + 0.5);
          candidates.push({ cx: px + Math.sin(angle) * off, cy: py - Math.cos(angle) * off });
        }
      }
      tally.branch.total++;
      const pick = placer.tryPlace(candidates.map((c) => rotatedBox(c.cx, c.cy, w, h, angle)), plot.box, MAX_PICK_COVER);
      if (pick === null) continue;
      tally.branch.shown++;
      const chosen = candidates[pick];
      addText(labels, text, chosen.cx - Math.sin(angle) * 0.35 * size, chosen.cy + Math.cos(angle) * 0.35 * size, {
        sizeMm: size,
        anchor: 'middle',
        fill: style.colour,
        halo: true,
        rotateDeg: (angle * 180) / Math.PI,
        role: 'branch-label',
      }).attr({ 'data-shot': a.id, 'data-side': side.side, 'data-kind': kind });
    }
  }
}

function crossoverMarks(parent: Container, a: ShotAnalysis, plot: Plot): void {
  for (const side of [a.left, a.right]) {
    if (!side || side.crossoverDistance === null || !Number.isFinite(side.crossoverDistance)) continue;
    const line = side.direct ?? side.refracted[0];
    if (!line || !(line.velocity === null || line.velocity > 0)) continue;
    const x = a.x + (side.side === 'right' ? 1 : -1) * side.crossoverDistance;
    const t = branchTimeMs(line, a.x, x);
    parent.circle(2.6).attr({ cx: round3(plot.x(x)), cy: round3(plot.t(t)), fill: 'none', stroke: INK.text, 'stroke-width': 0.3, 'data-role': 'crossover', 'data-shot': a.id, 'data-side': side.side, 'data-x': x });
  }
}

function shotX(survey: Survey, id: string): number | null {
  const shot = survey.shots.find((s) => s.id === id);
  return shot ? shot.x : null;
}

/** The tolerance the check used; an interpretation stored before checks carried it falls back to the engine's resolved option. */
function toleranceOf(check: { toleranceMs?: number }, survey: Survey): number {
  const t = check.toleranceMs;
  return typeof t === 'number' && Number.isFinite(t) ? t : resolveOptions(survey.options).reciprocalToleranceMs;
}

/**
 * The checks in the order their labels claim room: the worst misfit first, then the pairs
 * farthest apart (the long pairs carry the reciprocal times of the section). O(c log c).
 */
function reciprocalOrder(interpretation: Interpretation, survey: Survey): ReciprocalCheck[] {
  const separation = (c: ReciprocalCheck): number => Math.abs((shotX(survey, c.shots[1]) ?? 0) - (shotX(survey, c.shots[0]) ?? 0));
  return [...(interpretation.qc?.reciprocal ?? [])].sort(
    (p, q) => Number(p.ok) - Number(q.ok) || Math.abs(q.differenceMs) - Math.abs(p.differenceMs) || separation(q) - separation(p),
  );
}

/**
 * Each reciprocal pair: a bracket at shot B's position at the time shot A recorded there,
 * and one at A's position at the time B recorded there (reciprocity: the two should be
 * equal), with the misfit written beside one bracket. A failed check is joined by a line,
 * drawn bold in the alert colour, says "exceeds", and is always drawn. A passing pair is
 * drawn only where its label finds a place free of other labels: on a line of 40 shots
 * (779 pairs) brackets for every pair would hide the picks; the title block says how many
 * are written, and qc.reciprocal lists them all.
 */
function reciprocalMarks(
  parent: Container,
  labels: Container,
  checks: readonly ReciprocalCheck[],
  survey: Survey,
  plot: Plot,
  placer: LabelPlacer,
  tally: LabelTally,
): void {
  for (const check of checks) {
    const xa = shotX(survey, check.shots[0]);
    const xb = shotX(survey, check.shots[1]);
    if (xa === null || xb === null || !Number.isFinite(check.forwardMs) || !Number.isFinite(check.reverseMs)) continue;
    tally.reciprocal.total++;
    const colour = check.ok ? INK.text : INK.alert;
    const pa = { x: plot.x(xa), y: plot.t(check.reverseMs) };
    const pb = { x: plot.x(xb), y: plot.t(check.forwardMs) };
    const ends = [
      { p: pb, inward: Math.sign(pa.x - pb.x) || -1 },
      { p: pa, inward: Math.sign(pb.x - pa.x) || 1 },
    ];
    const tolerance = toleranceOf(check, survey);
    let text = `Δ ${formatMs(Math.abs(check.differenceMs))} ${check.shots[0]}/${check.shots[1]}`;
    if (check.wave === 'direct') text += ' direct';
    if (!check.ok) text += `, exceeds ${formatMs(tolerance)}`;
    const size = TEXT_MM.label * 0.85;
    const w = textWidthMm(text, size);
    const candidates: { x: number; y: number; anchor: 'start' | 'end' }[] = [];
    for (const { p, inward } of ends) {
      const anchor = inward > 0 ? 'start' : 'end';
      const x = p.x + inward * 1.8;
      // A failed pair looks farther for room: its label must be read.
      const offsets = check.ok ? [0, -2.6, 2.6, -5, 5] : [0, -2.6, 2.6, -5.2, 5.2, -7.8, 7.8, -10.4, 10.4, -13, 13];
      for (const dy of offsets) candidates.push({ x, y: p.y + size * 0.35 + dy, anchor });
    }
    const boxes = candidates.map((c) => {
      const x0 = c.anchor === 'start' ? c.x : c.x - w;
      return { x0, y0: c.y - size * 0.85, x1: x0 + w, y1: c.y + size * 0.25 };
    });
    const pick = placer.tryPlace(boxes, plot.box, check.ok ? MAX_PICK_COVER : Infinity);
    if (pick === null && check.ok) continue;
    const group = parent.group().attr({ 'data-role': 'reciprocal', 'data-shots': `${check.shots[0]}|${check.shots[1]}`, 'data-ok': String(check.ok) });
    if (check.wave === 'direct') group.attr('data-wave', 'direct');
    if (!check.ok) {
      group.line(round3(pa.x), round3(pa.y), round3(pb.x), round3(pb.y)).attr({ stroke: colour, 'stroke-width': 0.35, 'stroke-dasharray': '0.6 0.8' });
    }
    for (const { p, inward } of ends) {
      // A square bracket opening toward the other shot.
      const d = `M${round3(p.x + inward * 1)},${round3(p.y - 1.6)}L${round3(p.x)},${round3(p.y - 1.6)}L${round3(p.x)},${round3(p.y + 1.6)}L${round3(p.x + inward * 1)},${round3(p.y + 1.6)}`;
      group.path(d).attr({ fill: 'none', stroke: colour, 'stroke-width': check.ok ? 0.35 : 0.55, 'data-role': 'reciprocal-bracket' });
      placer.reserve({ x0: p.x - 1.2, y0: p.y - 1.8, x1: p.x + 1.2, y1: p.y + 1.8 });
    }
    if (pick === null) continue;
    tally.reciprocal.shown++;
    const chosen = candidates[pick];
    addText(labels, text, chosen.x, chosen.y, {
      sizeMm: size,
      anchor: chosen.anchor,
      fill: colour,
      weight: check.ok ? 'normal' : 'bold',
      halo: true,
      role: 'reciprocal-label',
    }).attr({ 'data-ok': String(check.ok), 'data-difference-ms': check.differenceMs });
  }
}

/**
 * A line under the plot frame saying which labels were left out for want of room, so a
 * missing Δ or velocity is never read as "not checked" or "not fitted".
 */
function labelNote(parent: Container, tally: LabelTally, box: Box): void {
  const parts: string[] = [];
  if (tally.reciprocal.shown < tally.reciprocal.total) parts.push(`Δ on ${tally.reciprocal.shown} of ${tally.reciprocal.total} pairs`);
  if (tally.branch.shown < tally.branch.total) parts.push(`velocity on ${tally.branch.shown} of ${tally.branch.total} branches`);
  if (parts.length === 0) return;
  // Right-aligned on the axis-title line, clear of the centred title.
  addText(parent, `${parts.join(', ')} (no room for more)`, box.x1, box.y1 + 1.2 + TEXT_MM.tick * 1.05 + TEXT_MM.label * 1.35, {
    sizeMm: TEXT_MM.caution,
    anchor: 'end',
    fill: INK.muted,
    role: 'label-note',
  });
}

function reciprocalSummary(interpretation: Interpretation, survey: Survey): { text: string; role: string; alert?: boolean }[] {
  const checks = interpretation.qc?.reciprocal ?? [];
  if (checks.length === 0) return [{ text: 'no reciprocal pair to check', role: 'reciprocal-summary' }];
  if (checks.some((c) => !c.ok)) return []; // qcSummary already carries the alert line.
  const tolerance = toleranceOf(checks[0], survey);
  const within = `all within ${formatMs(tolerance)}`;
  return [{ text: `reciprocal times: ${checks.length} ${checks.length === 1 ? 'pair' : 'pairs'}, ${within}`, role: 'reciprocal-summary' }];
}

function travelTimeLegend(survey: Survey, interpretation: Interpretation, analyses: Map<string, ShotAnalysis>, showModelled: boolean, every: number): LegendItem[] {
  // In order along the line, each shot's own colour and shape on a stroke of its colour.
  const items: LegendItem[] = shotOrder(survey).map(({ id, rank }) => {
    const style = shotStyle(rank);
    return {
      label: id,
      glyph: (g, cx, cy) => {
        g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: style.colour, 'stroke-width': 0.45 });
        marker(g, style.shape, cx, cy, PICK_MM, { colour: style.colour, strokeMm: 0.2 }).attr({ 'data-role': 'legend-shot', 'data-shot': id, 'data-shape': style.shape });
      },
    };
  });
  const grey = INK.muted;
  const all = [...analyses.values()];
  items.push({
    label: every === 1 ? 'picks and fitted branch, apparent velocity' : `picks (marker at every ${ordinal(every)}, dots between), fitted branch, velocity`,
    glyph: (g, cx, cy) => {
      g.line(round3(cx - 2.8), round3(cy + 0.8), round3(cx + 2.8), round3(cy - 0.8)).attr({ stroke: grey, 'stroke-width': 0.45 });
      marker(g, 'circle', cx, cy, PICK_MM, { colour: grey });
    },
  });
  items.push({ label: 'shot position (t = 0)', glyph: (g, cx, cy) => void marker(g, 'diamond', cx, cy, 2.2, { colour: grey }) });
  if (all.some((a) => a.phantom && a.phantom.times.some((t) => t !== null))) {
    items.push({
      label: 'phantomed arrivals',
      glyph: (g, cx, cy) => {
        g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: grey, 'stroke-width': 0.25, 'stroke-dasharray': '1.2 0.8' });
        marker(g, 'circle', cx, cy, PICK_MM, { colour: grey, hollow: true, strokeMm: 0.22 });
      },
    });
  }
  if (showModelled && all.some((a) => a.modelledMs && a.modelledMs.some((t) => t !== null))) {
    items.push({ label: 'modelled first arrivals', glyph: (g, cx, cy) => void g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: grey, 'stroke-width': 0.2, 'stroke-dasharray': '0.4 0.6' }) });
  }
  if (all.some((a) => [a.left, a.right].some((s) => s && s.crossoverDistance !== null))) {
    items.push({ label: 'crossover', glyph: (g, cx, cy) => void g.circle(2.6).attr({ cx: round3(cx), cy: round3(cy), fill: 'none', stroke: INK.text, 'stroke-width': 0.3 }) });
  }
  if ((interpretation.qc?.reciprocal ?? []).length > 0) {
    items.push({
      label: 'reciprocal times (at each shot of a pair), misfit Δ',
      glyph: (g, cx, cy) => {
        g.path(`M${round3(cx - 1.6)},${round3(cy - 1.4)}L${round3(cx - 2.6)},${round3(cy - 1.4)}L${round3(cx - 2.6)},${round3(cy + 1.4)}L${round3(cx - 1.6)},${round3(cy + 1.4)}`).attr({ fill: 'none', stroke: INK.text, 'stroke-width': 0.35 });
        g.path(`M${round3(cx + 1.6)},${round3(cy - 1.4)}L${round3(cx + 2.6)},${round3(cy - 1.4)}L${round3(cx + 2.6)},${round3(cy + 1.4)}L${round3(cx + 1.6)},${round3(cy + 1.4)}`).attr({ fill: 'none', stroke: INK.text, 'stroke-width': 0.35 });
      },
    });
  }
  return items;
}

/** Median gap between sorted positions, m (0 with fewer than two). O(n log n). */
function medianGap(xs: number[]): number {
  const sorted = [...xs].sort((a, b) => a - b);
  const gaps = sorted.slice(1).map((x, i) => x - sorted[i]).filter((g) => g > 0).sort((a, b) => a - b);
  return gaps.length > 0 ? gaps[gaps.length >> 1] : 0;
}

/** 2 → "2nd", 3 → "3rd", 4 → "4th", 11 → "11th". */
function ordinal(k: number): string {
  const tens = k % 100;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : k % 10 === 1 ? 'st' : k % 10 === 2 ? 'nd' : k % 10 === 3 ? 'rd' : 'th';
  return `${k}${suffix}`;
}
