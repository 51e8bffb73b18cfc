/**
 * What the interpretation found along the line, drawn on the section: steps with their
 * throw, lateral velocity changes, the refractor-velocity segments, and the layer labels.
 * Positions come from the interpretation; labels are placed so they do not overprint.
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Step, VelocityChange } from '../output/interpretation.js';
import type { SectionFrame } from './section-frame.js';
import type { ProfilePoint } from './refractor-path.js';
import { elevationOnProfile } from './refractor-path.js';
import type { Box, LabelPlacer } from './label-placer.js';
import { formatMetres, formatVelocity, round3 } from './format.js';
import { INK, SECTION_COLOURS } from './palette.js';
import { TEXT_MM, textWidthMm } from './page.js';
import { addText } from './text.js';

function labelBox(x: number, baselineY: number, text: string, sizeMm: number, anchor: 'start' | 'middle' | 'end', lines = 1): Box {
  const w = textWidthMm(text, sizeMm);
  const x0 = anchor === 'start' ? x : anchor === 'middle' ? x - w / 2 : x - w;
  return { x0: x0 - 0.5, y0: baselineY - sizeMm * 0.8 - 0.3, x1: x0 + w + 0.5, y1: baselineY + sizeMm * 0.25 + (lines - 1) * sizeMm * 1.15 + 0.3 };
}

/** The text of a step label: the throw, and which side is deeper ("rock step" for one in the second refractor). */
export function stepLabel(step: Step, kind: 'refractor' | 'rock' = 'refractor'): { main: string; side: string } {
  return {
    main: `${kind === 'rock' ? 'rock step' : 'step'} ${formatMetres(Math.abs(step.throw))}`,
    side: step.throw > 0 ? 'deeper to +x' : step.throw < 0 ? 'deeper to −x' : 'no throw',
  };
}

/**
 * A tick across the refractor at each step and its label. kind 'rock': steps in the second
 * refractor of a three-layer line (features.lowerRefractor.steps), drawn on that refractor
 * the same way, role 'rock-step'.
 */
export function stepMarkers(parent: Container, steps: readonly Step[], refractor: readonly ProfilePoint[][], frame: SectionFrame, placer: LabelPlacer, kind: 'refractor' | 'rock' = 'refractor'): void {
  for (const step of steps) {
    if (!Number.isFinite(step.x)) continue;
    const x = frame.x(step.x);
    const onRefractor = elevationOnProfile(refractor, step.x);
    const y = onRefractor === null ? (frame.plot.y0 + frame.plot.y1) / 2 : frame.elevation(onRefractor);
    const group = parent.group().attr({ 'data-role': kind === 'rock' ? 'rock-step' : 'step', 'data-x': step.x, 'data-throw': step.throw });
    group.line(round3(x), round3(y - 4), round3(x), round3(y + 4)).attr({ stroke: SECTION_COLOURS.step, 'stroke-width': 0.8, 'stroke-linecap': 'round' });
    const { main, side } = stepLabel(step, kind);
    const size = TEXT_MM.label;
    const candidates: { x: number; y: number; anchor: 'start' | 'end' }[] = [
      { x: x + 1.5, y: y + 7, anchor: 'start' },
      { x: x - 1.5, y: y + 7, anchor: 'end' },
      { x: x + 1.5, y: y + 13, anchor: 'start' },
      { x: x - 1.5, y: y + 13, anchor: 'end' },
      { x: x + 1.5, y: y - 8, anchor: 'start' },
      { x: x - 1.5, y: y - 8, anchor: 'end' },
    ];
    const chosen = candidates[placer.choose(candidates.map((c) => labelBox(c.x, c.y, main.length > side.length ? main : side, size, c.anchor, 2)), frame.plot)];
    addText(group, main, chosen.x, chosen.y, { sizeMm: size, anchor: chosen.anchor, weight: 'bold', fill: SECTION_COLOURS.step, halo: true, role: 'step-label' });
    addText(group, side, chosen.x, chosen.y + size * 1.15, { sizeMm: size * 0.85, anchor: chosen.anchor, fill: INK.text, halo: true });
  }
}

const BAR_ABOVE_FOOT_MM = 4;

/** Refractor velocity segments as a bar near the foot of the plot, each with its extent and value. */
export function velocityBar(parent: Container, segments: readonly { from: number; to: number; velocity: number }[], frame: SectionFrame, placer: LabelPlacer): void {
  if (segments.length === 0) return;
  const group = parent.group().attr('data-role', 'refractor-velocity');
  const y = frame.plot.y1 - BAR_ABOVE_FOOT_MM;
  for (const seg of segments) {
    if (!Number.isFinite(seg.from) || !Number.isFinite(seg.to) || !Number.isFinite(seg.velocity)) continue;
    const x0 = frame.x(Math.min(seg.from, seg.to));
    const x1 = frame.x(Math.max(seg.from, seg.to));
    const one = group.group().attr({ 'data-role': 'velocity-segment', 'data-from': seg.from, 'data-to': seg.to, 'data-velocity': seg.velocity });
    const stroke = { stroke: SECTION_COLOURS.refractor, 'stroke-width': 0.35 };
    one.line(round3(x0), round3(y), round3(x1), round3(y)).attr(stroke);
    one.line(round3(x0), round3(y - 1.2), round3(x0), round3(y + 1.2)).attr(stroke);
    one.line(round3(x1), round3(y - 1.2), round3(x1), round3(y + 1.2)).attr(stroke);
    const text = formatVelocity(seg.velocity);
    const cx = (x0 + x1) / 2;
    const candidates = [y - 1.5, y - 1.5 - TEXT_MM.label * 1.2].map((ty) => ({ y: ty, box: labelBox(cx, ty, text, TEXT_MM.label, 'middle') }));
    const chosen = candidates[placer.choose(candidates.map((c) => c.box))];
    addText(one, text, cx, chosen.y, { sizeMm: TEXT_MM.label, anchor: 'middle', fill: SECTION_COLOURS.refractor, halo: true, role: 'velocity-label' });
  }
}

export function velocityChangeMarkers(parent: Container, changes: readonly VelocityChange[], refractor: readonly ProfilePoint[][], frame: SectionFrame, placer: LabelPlacer): void {
  for (const change of changes) {
    if (!Number.isFinite(change.x)) continue;
    const x = frame.x(change.x);
    const onRefractor = elevationOnProfile(refractor, change.x);
    const top = onRefractor === null ? frame.plot.y0 + 20 : frame.elevation(onRefractor);
    const bottom = frame.plot.y1 - BAR_ABOVE_FOOT_MM - 1.5;
    const group = parent.group().attr({ 'data-role': 'velocity-change', 'data-x': change.x });
    group.line(round3(x), round3(top), round3(x), round3(bottom)).attr({ stroke: SECTION_COLOURS.velocityChange, 'stroke-width': 0.45, 'stroke-dasharray': '0.6 0.9' });
    const text = `${formatVelocity(change.left)} → ${formatVelocity(change.right)}`;
    const mid = (top + bottom) / 2;
    const candidates: { x: number; y: number; anchor: 'start' | 'end' }[] = [
      { x: x + 1.2, y: mid, anchor: 'start' },
      { x: x - 1.2, y: mid, anchor: 'end' },
      { x: x + 1.2, y: mid + 4, anchor: 'start' },
      { x: x - 1.2, y: mid + 4, anchor: 'end' },
      { x: x + 1.2, y: mid - 4, anchor: 'start' },
    ];
    const chosen = candidates[placer.choose(candidates.map((c) => labelBox(c.x, c.y, text, TEXT_MM.label * 0.9, c.anchor)), frame.plot)];
    addText(group, text, chosen.x, chosen.y, { sizeMm: TEXT_MM.label * 0.9, anchor: chosen.anchor, fill: SECTION_COLOURS.velocityChange, halo: true, role: 'velocity-change-label' });
  }
}

/**
 * A layer's velocity written inside it, at the first of several positions along the line
 * where it fits between its top and bottom and overprints nothing.
 */
export function layerLabel(
  parent: Container,
  text: string,
  frame: SectionFrame,
  placer: LabelPlacer,
  topAt: (xM: number) => number | null,
  bottomAt: (xM: number) => number | null,
  xCandidatesM: readonly number[],
): void {
  const size = TEXT_MM.label;
  const options: { x: number; y: number; box: Box }[] = [];
  for (const xm of xCandidatesM) {
    const top = topAt(xm);
    const bottom = bottomAt(xm);
    if (top === null || bottom === null) continue;
    const y0 = frame.elevation(top);
    const y1 = Math.min(frame.elevation(bottom), frame.plot.y1 - BAR_ABOVE_FOOT_MM - TEXT_MM.label * 2.6);
    if (y1 - y0 < size * 1.3) continue;
    const x = frame.x(xm);
    const y = (y0 + y1) / 2 + size * 0.35;
    const box = labelBox(x, y, text, size, 'middle');
    // The whole label must sit over the layer, not hang past the end of a covered stretch.
    const ends = [frame.x.invert(box.x0), frame.x.invert(box.x1)];
    if (ends.some((e) => topAt(e) === null || bottomAt(e) === null)) continue;
    options.push({ x, y, box });
  }
  if (options.length === 0) return;
  const chosen = options[placer.choose(options.map((o) => o.box), frame.plot)];
  addText(parent, text, chosen.x, chosen.y, { sizeMm: size, anchor: 'middle', halo: true, role: 'layer-label' });
}
