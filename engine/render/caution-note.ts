/**
 * The cautions every section carries (engine/cautions.ts, DESIGN.md "Cautions"), in small
 * type along the bottom of the page. Each caution is one group (data-role="caution") whose
 * wrapped lines read back as the caution's full text.
 */
import type { Container } from '@svgdotjs/svg.js';
import { INK } from './palette.js';
import { TEXT_MM } from './page.js';
import { addText, wrapText } from './text.js';

const LEADING = 1.3;

function wrappedCautions(cautions: readonly string[], widthMm: number): string[][] {
  return cautions.map((c) => wrapText(c, widthMm, TEXT_MM.caution));
}

/** Height the note needs, mm. */
export function cautionNoteHeightMm(cautions: readonly string[], widthMm: number): number {
  const lines = wrappedCautions(cautions, widthMm).reduce((n, l) => n + l.length, 0);
  return lines === 0 ? 0 : lines * TEXT_MM.caution * LEADING + 1;
}

/** Draws the note with its top at yTopMm. */
export function cautionNote(parent: Container, cautions: readonly string[], xMm: number, yTopMm: number, widthMm: number): void {
  const group = parent.group().attr('data-role', 'cautions');
  let y = yTopMm + TEXT_MM.caution;
  for (const lines of wrappedCautions(cautions, widthMm)) {
    const one = group.group().attr('data-role', 'caution');
    for (const line of lines) {
      addText(one, line, xMm, y, { sizeMm: TEXT_MM.caution, fill: INK.muted, role: 'caution-line' });
      y += TEXT_MM.caution * LEADING;
    }
  }
}
