/**
 * A fresh SVG canvas per render. svg.js keeps the window it draws into as module state,
 * so every render makes its own svgdom window and registers it: renders are independent
 * of each other and of anything drawn before. Ids are set by hand (never svg.js's
 * counters), which keeps two renders of the same input byte-identical.
 */
import { createSVGWindow } from 'svgdom';
import { SVG, registerWindow, type Svg } from '@svgdotjs/svg.js';
import { FONT_FAMILY, PAGE, type PageSize } from './page.js';
import { INK } from './palette.js';

export interface Canvas {
  svg: Svg;
  /** The finished, standalone SVG document as a string. */
  serialize(): string;
}

export function createCanvas(title: string, page: PageSize = PAGE): Canvas {
  const window = createSVGWindow();
  const document = window.document;
  registerWindow(window, document);
  const svg = SVG(document.documentElement) as Svg;
  svg.attr({
    width: `${page.widthMm}mm`,
    height: `${page.heightMm}mm`,
    viewBox: `0 0 ${page.widthMm} ${page.heightMm}`,
    'font-family': FONT_FAMILY,
    fill: INK.text,
  });
  // <title> names the drawing for screen readers and browser tabs; text is escaped.
  const titleElement = document.createElementNS('http://www.w3.org/2000/svg', 'title');
  titleElement.appendChild(document.createTextNode(title));
  svg.node.appendChild(titleElement);
  svg.rect(page.widthMm, page.heightMm).attr({ x: 0, y: 0, fill: '#ffffff', 'data-role': 'page' });
  return {
    svg,
    serialize() {
      // svg.js writes xmlns as a plain attribute, which svgdom's XML serialiser rejects;
      // the serialiser emits the namespace itself once the attribute is gone.
      document.documentElement.removeAttribute('xmlns');
      return svg.svg();
    },
  };
}
