/**
 * Scale bars: a horizontal bar of a round length in metres, in alternating black and white
 * parts, and a vertical one for the (exaggerated) elevation scale, so the drawing can still
 * be measured after it is copied at another size. Lengths come from the drawing's scales. O(1).
 */
import type { Container } from '@svgdotjs/svg.js';
import { round3 } from './format.js';
import { INK } from './palette.js';
import { addText } from './text.js';

const BAR_MM = 1.4;
const TEXT_MM = 2.2;

/** The longest 1, 2, 5 × 10ⁿ m that is at most `maxMm` on paper at `mmPerM`. */
export function barLengthM(mmPerM: number, maxMm: number): number {
  const raw = maxMm / mmPerM;
  const power = Math.pow(10, Math.floor(Math.log10(raw)));
  let best = power;
  for (const m of [1, 2, 5]) if (m * power <= raw * (1 + 1e-9)) best = m * power;
  return best;
}

function label(value: number): string {
  return String(Number(value.toPrecision(6)));
}

/** Horizontal bar from (x0, y); returns its width on paper, mm. */
export function horizontalScaleBar(parent: Container, x0: number, y: number, mmPerM: number, maxMm: number): number {
  const lengthM = barLengthM(mmPerM, maxMm);
  const mantissa = Math.round(lengthM / Math.pow(10, Math.floor(Math.log10(lengthM))));
  const parts = mantissa === 2 ? 4 : 5;
  const widthMm = lengthM * mmPerM;
  const group = parent.group().attr({ 'data-role': 'scale-bar', 'data-length-m': lengthM, 'data-length-mm': round3(widthMm) });
  for (let i = 0; i < parts; i++) {
    group.rect(round3(widthMm / parts), BAR_MM).attr({
      x: round3(x0 + (i * widthMm) / parts),
      y: round3(y),
      fill: i % 2 === 0 ? INK.text : '#ffffff',
      stroke: INK.text,
      'stroke-width': 0.15,
      'data-role': 'scale-bar-part',
    });
  }
  const ty = y + BAR_MM + TEXT_MM * 1.05;
  addText(group, '0', x0, ty, { sizeMm: TEXT_MM, anchor: 'middle', role: 'scale-bar-label' });
  addText(group, label(lengthM / 2), x0 + widthMm / 2, ty, { sizeMm: TEXT_MM, anchor: 'middle', role: 'scale-bar-label' });
  addText(group, `${label(lengthM)} m`, x0 + widthMm, ty, { sizeMm: TEXT_MM, anchor: 'start', role: 'scale-bar-label' }).attr('dx', -0.6);
  return widthMm;
}

/** Vertical bar standing on (x, yBottom); returns its height on paper, mm. */
export function verticalScaleBar(parent: Container, x: number, yBottom: number, verticalMmPerM: number, maxMm: number): number {
  const lengthM = barLengthM(verticalMmPerM, maxMm);
  const heightMm = lengthM * verticalMmPerM;
  const group = parent.group().attr({ 'data-role': 'vertical-scale-bar', 'data-length-m': lengthM, 'data-length-mm': round3(heightMm) });
  group.rect(BAR_MM, round3(heightMm / 2)).attr({ x: round3(x), y: round3(yBottom - heightMm), fill: INK.text, stroke: INK.text, 'stroke-width': 0.15 });
  group.rect(BAR_MM, round3(heightMm / 2)).attr({ x: round3(x), y: round3(yBottom - heightMm / 2), fill: '#ffffff', stroke: INK.text, 'stroke-width': 0.15 });
  addText(group, `${label(lengthM)} m`, x + BAR_MM + 0.8, yBottom - heightMm + TEXT_MM * 0.7, { sizeMm: TEXT_MM, role: 'scale-bar-label' });
  return heightMm;
}
