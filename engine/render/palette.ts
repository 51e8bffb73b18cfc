/**
 * Arcline's colours, in one place. Chosen for this project (not taken from another
 * program's scheme; the shot colours come from a published colour-blind-safe scheme) and
 * checked for the two common red–green colour-vision deficiencies.
 *
 * How they were checked (numbers in README.md, "The drawings", re-checked by
 * tests/engine/render/palette.test.ts):
 * - Every line and marker colour has a contrast ratio of at least 3:1 against white, the
 *   WCAG 2.1 minimum for graphical objects (W3C, WCAG 2.1, success criterion 1.4.11),
 *   using the WCAG relative-luminance definition.
 * - The shot colours (Paul Tol's "muted" scheme, see SHOT_COLOURS) spread over hue and
 *   luminance, so they stay apart when red and green collapse: simulated protanopia and deuteranopia
 *   (Machado, Oliveira & Fernandes, IEEE TVCG 15(6), 2009, severity 1 matrices, quoted from
 *   memory) keep every pair at least 15 CIELAB units apart.
 * - Colour is never the only cue: shots also get one of ten marker shapes, the refractor
 *   is a heavy line, the second refractor is dashed, a failed reciprocal check is bold and
 *   says "exceeds".
 */

import type { MethodName } from '../survey/survey.js';

/** Depth-section roles. */
export const SECTION_COLOURS = {
  /** Ground surface line. */
  ground: '#4a3b2c',
  /** Top layer (above the first refractor): pale sand. */
  layer1Fill: '#f4e7c5',
  /** Layer below the first refractor: pale blue-grey. */
  layer2Fill: '#d6e2ee',
  /** Layer below a second refractor: darker blue-grey. */
  layer3Fill: '#a8b9cf',
  /** First refractor: heavy deep blue. */
  refractor: '#1d3f8f',
  /** Second refractor: dashed dark brown. */
  refractor2: '#7a2a10',
  /** Depth arcs about each geophone: light, thin. */
  arc: '#8aa0bf',
  /** Geophone triangles. */
  geophone: '#2b2b2b',
  /** Shot stars. */
  shot: '#e07000',
  /** Step in the refractor. */
  step: '#c94aa0',
  /** Lateral change of refractor velocity. */
  velocityChange: '#0c7c6c',
  /** "No coverage" hatching. */
  noCoverage: '#8c8c8c',
} as const;

/** GRM functions (grm-functions.ts): the optimum XY heavy in the refractor's blue, the other XYs thin grey (4.5:1 on white). */
export const GRM_COLOURS = {
  optimum: '#1d3f8f',
  other: '#767676',
} as const;

/**
 * The refractor of each method on the comparison (method-comparison.ts): plus-minus in the
 * section's refractor blue, solid; GRM wine, dashed; time terms green, dotted (wine and green
 * from the shot colours' colour-blind-safe scheme). The dash pattern alone tells them apart.
 */
export const METHOD_STYLES = {
  'plus-minus': { colour: '#1d3f8f', widthMm: 0.6, dash: null, words: 'solid' },
  grm: { colour: '#882255', widthMm: 0.5, dash: '2.2 1.1', words: 'dashed' },
  'time-term': { colour: '#117733', widthMm: 0.75, dash: '0.05 1.1', words: 'dotted' },
} as const satisfies Record<MethodName, { colour: string; widthMm: number; dash: string | null; words: string }>;

/** Shared text and frame colours. */
export const INK = {
  text: '#222222',
  muted: '#555555',
  frame: '#444444',
  grid: '#e3e3e3',
  /** A failed check (reciprocal misfit over tolerance); always paired with bold text. */
  alert: '#c23a00',
  /** Halo behind labels drawn over lines. */
  halo: '#ffffff',
} as const;

/**
 * Categorical colours for shots on the time–distance plot, in order of use: six of the nine
 * colours of Paul Tol's "muted" qualitative scheme (P. Tol, "Colour Schemes", SRON technical
 * note SRON/EPS/TN/09-002, 2021; designed to stay distinct for colour-blind readers), plus
 * black. The other three (sand #DDCC77, cyan #88CCEE, teal #44AA99) fall below 3:1 on
 * white. Ordered so that neighbours differ in hue and lightness, the last and the first too.
 * Seven colours and ten marker shapes (markers.ts SHOT_SHAPES) cycle together: shot k gets
 * colour k mod 7 and shape k mod 10, so 70 shots get distinct pairs (7 and 10 are coprime)
 * and neighbours differ in both.
 */
export const SHOT_COLOURS: readonly string[] = [
  '#332288', // indigo
  '#999933', // olive
  '#882255', // wine
  '#117733', // green
  '#cc6677', // rose
  '#000000', // black
  '#aa4499', // purple
];
