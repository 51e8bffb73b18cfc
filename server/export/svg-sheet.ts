/**
 * One drawn sheet (an SVG string from engine/render) read into a DOM the export can adjust
 * and write back. svgdom is the DOM the renderer itself draws into.
 */
import { createSVGWindow } from 'svgdom';

/** The root <svg> element of the text. Throws when the text is not one <svg>. */
export function parseSheet(svgText: string): Element {
  const holder = createSVGWindow().document.documentElement;
  holder.innerHTML = svgText;
  const root = holder.firstElementChild;
  if (root === null || root.nodeName.toLowerCase() !== 'svg') throw new Error('parseSheet: the text is not one <svg> element');
  return root;
}

export function serialiseSheet(root: Element): string {
  return root.outerHTML;
}

/** Millimetres per unit of an SVG length (CSS units: 96 px to the inch). */
const MM_PER_UNIT: Record<string, number> = { mm: 1, cm: 10, in: 25.4, pt: 25.4 / 72, pc: 25.4 / 6, px: 25.4 / 96, '': 25.4 / 96 };

/** A length attribute ("277mm", "1047", "11in") in mm, or null when absent or unreadable. */
export function lengthMm(value: string | null): number | null {
  const match = /^\s*([0-9]*\.?[0-9]+(?:e[+-]?\d+)?)\s*(mm|cm|in|pt|pc|px)?\s*$/i.exec(value ?? '');
  if (!match) return null;
  const number = Number(match[1]);
  return number > 0 ? number * MM_PER_UNIT[(match[2] ?? '').toLowerCase()] : null;
}

/** The sheet's size on paper, mm, from its width and height (the renderer always gives both, in mm). */
export function sheetSizeMm(root: Element): { widthMm: number; heightMm: number } {
  const widthMm = lengthMm(root.getAttribute('width'));
  const heightMm = lengthMm(root.getAttribute('height'));
  if (widthMm === null || heightMm === null) throw new Error('sheetSizeMm: the drawing has no width and height');
  return { widthMm, heightMm };
}

/** The value of a presentation attribute on the element or its nearest ancestor that sets it. */
export function inherited(element: Element, name: string): string | null {
  // svgdom leaves parentElement undefined above the root, so walk parentNode to the document.
  for (let node: Node | null = element; node?.nodeType === 1; node = node.parentNode) {
    const value = (node as Element).getAttribute(name);
    if (value !== null) return value;
  }
  return null;
}
