/**
 * Reading and adjusting one drawn sheet (an SVG string from engine/render) as text, for the
 * PDF. The renderer's output is regular XML (attributes always double-quoted, text escaped,
 * no comments), so a tag scanner is enough, and it is fast: a DOM parse and re-serialise
 * of a 240-geophone, 12-shot time–distance plot (685 kB) took about 2 s on the 2-core
 * machine, this takes milliseconds. Everything here is O(length of the SVG).
 */

/** A start or end tag: end mark, name, attribute text, self-closing mark. */
const TAG = /<(\/?)([A-Za-z][\w:.-]*)((?:\s+[\w:.-]+\s*=\s*"[^"]*")*)\s*(\/?)>/g;
const ATTRIBUTE = /([\w:.-]+)\s*=\s*"([^"]*)"/g;

export function attributes(attributeText: string): Map<string, string> {
  const found = new Map<string, string>();
  for (const match of attributeText.matchAll(ATTRIBUTE)) found.set(match[1], match[2]);
  return found;
}

export function attributeText(values: Map<string, string>): string {
  return [...values].map(([name, value]) => ` ${name}="${value}"`).join('');
}

/** XML text or attribute value → plain text (the five entities and character references). */
export function decodeXml(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|amp|lt|gt|quot|apos);/gi, (_, entity: string) => {
    const lower = entity.toLowerCase();
    if (lower.startsWith('#x')) return String.fromCodePoint(parseInt(lower.slice(2), 16));
    if (lower.startsWith('#')) return String.fromCodePoint(Number(lower.slice(1)));
    return { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" }[lower]!;
  });
}

/** Millimetres per unit of an SVG length (CSS units: 96 px to the inch). */
const MM_PER_UNIT: Record<string, number> = { mm: 1, cm: 10, in: 25.4, pt: 25.4 / 72, pc: 25.4 / 6, px: 25.4 / 96, '': 25.4 / 96 };

/** A length attribute ("277mm", "1047", "11in") in mm, or null when absent or unreadable. */
export function lengthMm(value: string | null | undefined): number | null {
  const match = /^\s*([0-9]*\.?[0-9]+(?:e[+-]?\d+)?)\s*(mm|cm|in|pt|pc|px)?\s*$/i.exec(value ?? '');
  if (!match) return null;
  const number = Number(match[1]);
  return number > 0 ? number * MM_PER_UNIT[(match[2] ?? '').toLowerCase()] : null;
}

function rootTag(svg: string): RegExpExecArray {
  TAG.lastIndex = 0;
  const match = TAG.exec(svg);
  if (match === null || match[1] !== '' || match[2] !== 'svg') throw new Error('svg-sheet: the text does not start with an <svg> element');
  return match;
}

/** The sheet's size on paper, mm, from its width and height (the renderer always gives both, in mm). */
export function sheetSizeMm(svg: string): { widthMm: number; heightMm: number } {
  const root = attributes(rootTag(svg)[3]);
  const widthMm = lengthMm(root.get('width'));
  const heightMm = lengthMm(root.get('height'));
  if (widthMm === null || heightMm === null) throw new Error('svg-sheet: the drawing has no width and height');
  return { widthMm, heightMm };
}

/** The same sheet drawn at another size on paper (its viewBox unchanged, so it scales whole). */
export function withSheetSize(svg: string, widthMm: number, heightMm: number): string {
  const tag = rootTag(svg);
  const root = attributes(tag[3]);
  root.set('width', `${widthMm}mm`);
  root.set('height', `${heightMm}mm`);
  return `<svg${attributeText(root)}${tag[4] ? '/' : ''}>${svg.slice(tag.index + tag[0].length)}`;
}

/**
 * Groups clipped to a plain rectangle (`clip-path` naming a `<clipPath>` of one `<rect>`
 * in user space) become nested `<svg overflow="hidden">` viewports of that rectangle, with
 * the same coordinates: the same clip, but svg-to-pdfkit draws it without first computing
 * the bounding box of everything in the group (which it does for any clip-path, and which
 * took half the time of a 240-geophone plot). Other clips are left as they are.
 */
export function clipRectsAsViewports(svg: string): string {
  const rects = new Map<string, { x: number; y: number; width: number; height: number }>();
  const clipPath = /<clipPath((?:\s+[\w:.-]+\s*=\s*"[^"]*")*)\s*>\s*<rect((?:\s+[\w:.-]+\s*=\s*"[^"]*")*)\s*(?:\/>|>\s*<\/rect>)\s*<\/clipPath>/g;
  for (const match of svg.matchAll(clipPath)) {
    const clip = attributes(match[1]);
    const rect = attributes(match[2]);
    const id = clip.get('id');
    const units = clip.get('clipPathUnits') ?? 'userSpaceOnUse';
    if (id === undefined || units !== 'userSpaceOnUse' || clip.has('transform') || rect.has('transform') || rect.has('rx') || rect.has('ry')) continue;
    const [x, y, width, height] = ['x', 'y', 'width', 'height'].map((name) => Number(rect.get(name) ?? 0));
    if ([x, y, width, height].every(Number.isFinite) && width > 0 && height > 0) rects.set(id, { x, y, width, height });
  }
  if (rects.size === 0) return svg;
  const out: string[] = [];
  const open: boolean[] = []; // per open element: was it wrapped in a viewport?
  let last = 0;
  TAG.lastIndex = 0;
  for (let match = TAG.exec(svg); match !== null; match = TAG.exec(svg)) {
    const [whole, end, name, attributeSource, selfClosing] = match;
    if (selfClosing) continue;
    if (end) {
      if (open.pop() === true) {
        out.push(svg.slice(last, match.index), `</${name}></svg>`);
        last = match.index + whole.length;
      }
      continue;
    }
    const values = attributes(attributeSource);
    const id = /^url\(#([^)]+)\)$/.exec(values.get('clip-path') ?? '')?.[1];
    const rect = name === 'g' && id !== undefined ? rects.get(id) : undefined;
    open.push(rect !== undefined);
    if (rect === undefined) continue;
    values.delete('clip-path');
    const { x, y, width, height } = rect;
    out.push(
      svg.slice(last, match.index),
      `<svg x="${x}" y="${y}" width="${width}" height="${height}" viewBox="${x} ${y} ${width} ${height}" overflow="hidden"><g${attributeText(values)}>`,
    );
    last = match.index + whole.length;
  }
  out.push(svg.slice(last));
  return out.join('');
}
