/**
 * The depth section's legend: one entry per kind of mark the sheet can carry, only those the
 * line needs, with the same dash patterns and colours as the drawing.
 */
import type { LegendItem } from './legend.js';
import { marker } from './markers.js';
import { INK, SECTION_COLOURS } from './palette.js';
import { fixed, round3 } from './format.js';
import { HATCH_ID } from './section-layers.js';
import { SOURCE_DASH } from './refractor-sources.js';

export interface SectionLegendNeeds {
  hasSecond: boolean;
  oneSided: boolean;
  interpolated: boolean;
  band: boolean;
  hiddenLimit: boolean;
  arcs: boolean;
  uncovered: boolean;
  steps: boolean;
  changes: boolean;
  matchLines: boolean;
  /** Depth labels in brackets or with "~" or "–" appear in the rows. */
  depthMarks: boolean;
}

/** Dash pattern of the hidden-layer limit: dash-dot, unlike any refractor stretch. */
export const HIDDEN_LIMIT_DASH = '3 1 0.5 1';
/** Dash pattern of a match line. */
export const MATCH_LINE_DASH = '5 1.2 1 1.2';

type Glyph = LegendItem['glyph'];

const swatch = (colour: string, opacity = 1): Glyph => (g, cx, cy) => {
  g.rect(5, 2.6).attr({ x: round3(cx - 2.5), y: round3(cy - 1.3), fill: colour, 'fill-opacity': opacity, stroke: INK.frame, 'stroke-width': 0.15 });
};
const stroke = (colour: string, width: number, dash?: string): Glyph => (g, cx, cy) => {
  const line = g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: colour, 'stroke-width': width });
  if (dash) line.attr('stroke-dasharray', dash);
};

/** `band`: the smallest and largest ±1σ depth the interpretation gives, m, stated in the band's entry. */
export function sectionLegend(needs: SectionLegendNeeds, band: { min: number; max: number } | null = null): LegendItem[] {
  const items: LegendItem[] = [
    {
      label: 'ground, geophones',
      glyph: (g, cx, cy) => {
        stroke(SECTION_COLOURS.ground, 0.45)(g, cx, cy + 0.9);
        marker(g, 'triangle-down', cx, cy, 1.8, { colour: SECTION_COLOURS.geophone, strokeMm: 0.1 });
      },
    },
    { label: 'shot', glyph: (g, cx, cy) => void marker(g, 'star', cx, cy, 2.8, { colour: SECTION_COLOURS.shot, strokeMm: 0.15 }) },
    { label: needs.hasSecond ? 'first refractor, timed from both sides' : 'refractor, timed from both sides', glyph: stroke(SECTION_COLOURS.refractor, 0.8) },
  ];
  if (needs.oneSided) items.push({ label: 'with phantomed arrivals, or one-way (intercept)', glyph: stroke(SECTION_COLOURS.refractor, 0.8, SOURCE_DASH['one-sided']) });
  if (needs.interpolated) {
    items.push({
      label: 'interpolated between stations',
      glyph: (g, cx, cy) => void g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: SECTION_COLOURS.refractor, 'stroke-width': 0.8, 'stroke-dasharray': SOURCE_DASH.interpolated, 'stroke-linecap': 'round' }),
    });
  }
  if (needs.band) {
    const range = band ? (fixed(band.min, 2) === fixed(band.max, 2) ? ` (${fixed(band.max, 2)} m)` : ` (${fixed(band.min, 2)}–${fixed(band.max, 2)} m)`) : '';
    items.push({ label: `depth ±1σ${range}, band along the refractor`, glyph: swatch(SECTION_COLOURS.refractor, 0.3) });
  }
  if (needs.hasSecond) items.push({ label: 'second refractor', glyph: stroke(SECTION_COLOURS.refractor2, 0.6) });
  if (needs.hiddenLimit) items.push({ label: 'deepest refractor if a hidden layer is present (see warnings)', glyph: stroke(SECTION_COLOURS.refractor, 0.35, HIDDEN_LIMIT_DASH) });
  if (needs.arcs) {
    items.push({
      label: 'depth arcs',
      glyph: (g, cx, cy) => void g.path(`M${round3(cx - 2.6)},${round3(cy - 1)}A2.6,2 0 0 0 ${round3(cx + 2.6)},${round3(cy - 1)}`).attr({ fill: 'none', stroke: SECTION_COLOURS.arc, 'stroke-width': 0.25 }),
    });
  }
  items.push({ label: 'top layer', glyph: swatch(SECTION_COLOURS.layer1Fill) });
  items.push({ label: 'below refractor', glyph: swatch(SECTION_COLOURS.layer2Fill) });
  if (needs.hasSecond) items.push({ label: 'below second refractor', glyph: swatch(SECTION_COLOURS.layer3Fill) });
  if (needs.uncovered) items.push({ label: 'no coverage: no refractor drawn', glyph: swatch(`url(#${HATCH_ID})`) });
  if (needs.steps) items.push({ label: 'step (throw)', glyph: (g, cx, cy) => void g.line(round3(cx), round3(cy - 1.6), round3(cx), round3(cy + 1.6)).attr({ stroke: SECTION_COLOURS.step, 'stroke-width': 0.8 }) });
  if (needs.changes) items.push({ label: 'velocity change', glyph: (g, cx, cy) => void g.line(round3(cx), round3(cy - 1.6), round3(cx), round3(cy + 1.6)).attr({ stroke: SECTION_COLOURS.velocityChange, 'stroke-width': 0.45, 'stroke-dasharray': '0.6 0.9' }) });
  if (needs.matchLines) items.push({ label: 'match line (sheet edge)', glyph: (g, cx, cy) => void g.line(round3(cx), round3(cy - 1.6), round3(cx), round3(cy + 1.6)).attr({ stroke: INK.text, 'stroke-width': 0.5, 'stroke-dasharray': '1.2 0.5' }) });
  if (needs.depthMarks) items.push({ label: 'depths: (8.1) phantomed or one-way · ~8.1 interpolated · – none', glyph: () => undefined });
  return items;
}
