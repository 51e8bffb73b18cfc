/**
 * The title block across the top of a plot: the line's name large, a line of particulars
 * under it, the survey's date/site text on a third line when there is one, and short notes
 * right-aligned on the other side (scale, dip, checks). Text that would run into the notes
 * is set smaller, then cut with an ellipsis (the full name stays in the SVG's <title>).
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Interpretation } from '../output/interpretation.js';
import { fixed } from './format.js';
import { INK } from './palette.js';
import { PAGE, TEXT_MM, textWidthMm, type PageSize } from './page.js';
import { addText } from './text.js';

export interface TitleBlockContent {
  title: string;
  subtitle: string;
  /** Free text from the survey (date, site, crew); its own line, absent when empty. */
  dateLine?: string;
  /** Right-hand notes, one per line; `alert` lines are bold in the alert colour. */
  notes: { text: string; role?: string; alert?: boolean }[];
  /**
   * Lines of running text under the date on the left (the section's warnings in words),
   * already wrapped to `titleLeftWidthMm`; set at REMARK_MM.
   */
  remarks?: { text: string; role: string }[];
  /** The drawing area (default PAGE, A4 landscape). */
  page?: PageSize;
}

/** Size of the remark lines, mm (above the 2 mm floor of the smallest type). */
export const REMARK_MM = 2.6;
const REMARK_LEAD = 1.3;

/** Width left of the notes column, mm: where the title, particulars and remarks go. */
export function titleLeftWidthMm(content: Pick<TitleBlockContent, 'notes' | 'page'>): number {
  const page = content.page ?? PAGE;
  const noteWidth = Math.max(0, ...content.notes.map((n) => textWidthMm(n.text, TEXT_MM.subtitle)));
  return page.widthMm - 2 * page.marginMm - noteWidth - 6;
}

/** Fits text to a width: the size it is set at and the (possibly shortened) text. */
export function fitText(text: string, widthMm: number, sizeMm: number, minSizeMm: number): { text: string; sizeMm: number } {
  if (textWidthMm(text, sizeMm) <= widthMm) return { text, sizeMm };
  const shrunk = Math.max(minSizeMm, (sizeMm * widthMm) / textWidthMm(text, sizeMm));
  if (textWidthMm(text, shrunk) <= widthMm) return { text, sizeMm: shrunk };
  const maxChars = Math.max(8, Math.floor(widthMm / (shrunk * 0.56)));
  return { text: `${text.slice(0, maxChars - 1)}…`, sizeMm: shrunk };
}

/** Where the rule under the block will sit, mm: depends only on the number of lines, not their text. */
export function titleBlockBottomMm(content: { dateLine?: string; notes: unknown[]; remarks?: unknown[]; page?: PageSize }): number {
  const page = content.page ?? PAGE;
  const hasDate = typeof content.dateLine === 'string' && content.dateLine.trim().length > 0;
  const remarks = content.remarks?.length ?? 0;
  const leftBottom = page.marginMm + TEXT_MM.title + TEXT_MM.subtitle * 1.6 + (hasDate ? TEXT_MM.subtitle * 1.35 : 0) + (remarks > 0 ? REMARK_MM * 0.4 + remarks * REMARK_MM * REMARK_LEAD : 0);
  const notesBottom = page.marginMm + TEXT_MM.subtitle + (content.notes.length - 1) * TEXT_MM.subtitle * 1.4;
  return Math.max(leftBottom, notesBottom) + 2.4;
}

/** Draws the block; returns the y (mm) of the rule under it. */
export function titleBlock(parent: Container, content: TitleBlockContent): number {
  const group = parent.group().attr('data-role', 'title-block');
  const page = content.page ?? PAGE;
  const left = page.marginMm;
  const right = page.widthMm - page.marginMm;
  const noteLead = TEXT_MM.subtitle * 1.4;
  const room = titleLeftWidthMm(content);
  const title = fitText(content.title, room, TEXT_MM.title, 3.6);
  let y = page.marginMm + TEXT_MM.title;
  addText(group, title.text, left, y, { sizeMm: title.sizeMm, weight: 'bold', role: 'title' });
  const subtitle = fitText(content.subtitle, room, TEXT_MM.subtitle, 2.6);
  y += TEXT_MM.subtitle * 1.6;
  addText(group, subtitle.text, left, y, { sizeMm: subtitle.sizeMm, fill: INK.muted, role: 'subtitle' });
  if (content.dateLine && content.dateLine.trim().length > 0) {
    const date = fitText(content.dateLine.trim(), room, TEXT_MM.subtitle, 2.6);
    y += TEXT_MM.subtitle * 1.35;
    addText(group, date.text, left, y, { sizeMm: date.sizeMm, fill: INK.muted, role: 'date' });
  }
  if (content.remarks && content.remarks.length > 0) {
    y += REMARK_MM * 0.4;
    for (const remark of content.remarks) {
      y += REMARK_MM * REMARK_LEAD;
      addText(group, remark.text, left, y, { sizeMm: REMARK_MM, fill: INK.text, role: remark.role });
    }
  }
  content.notes.forEach((note, i) => {
    addText(group, note.text, right, page.marginMm + TEXT_MM.subtitle + i * noteLead, {
      sizeMm: TEXT_MM.subtitle,
      anchor: 'end',
      role: note.role,
      weight: note.alert ? 'bold' : 'normal',
      fill: note.alert ? INK.alert : INK.text,
    });
  });
  const bottom = titleBlockBottomMm(content);
  group.line(left, bottom, right, bottom).attr({ stroke: INK.frame, 'stroke-width': 0.25 });
  return bottom;
}

/**
 * Title-block notes that say how many layers the section shows and why, read from the
 * interpretation (nothing computed here): with `qc.layerChoice` (issue 10) the criterion and
 * each candidate's BIC and residual RMS as the engine reported them; else whether the count
 * was asked for (`forcedLayers`, the survey's options.layers) or read from the picks' branches.
 */
export function layerCountNotes(interpretation: Interpretation, forcedLayers: 2 | 3 | undefined): { text: string; role: string }[] {
  const n = interpretation.layers.length;
  if (n === 0) return [];
  const choice = interpretation.qc?.layerChoice;
  if (choice && choice.candidates.length > 0) {
    const taken = choice.candidates.find((c) => c.label === choice.chosen);
    if (taken) {
      return [
        { text: `${taken.layers} layers taken (${taken.label}): lowest BIC`, role: 'layer-count' },
        ...choice.candidates.map((c) => ({
          text: `${c.label} · ${c.layers} layers · RMS ${fixed(c.rmsMs, 2)} ms · BIC ${fixed(c.bic, 1)}`,
          role: 'layer-count-candidate',
        })),
      ];
    }
  }
  if (forcedLayers !== undefined) {
    return [{ text: forcedLayers === n ? `${n} layers, as asked (options.layers)` : `${n} layers (${forcedLayers} asked for; the picks show no more)`, role: 'layer-count' }];
  }
  return [{ text: `${n} layers, from the picks' branches`, role: 'layer-count' }];
}
