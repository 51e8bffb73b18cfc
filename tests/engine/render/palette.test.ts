import { describe, expect, it } from 'vitest';
import { SECTION_COLOURS, SHOT_COLOURS, INK, GRM_COLOURS, METHOD_STYLES } from '../../../engine/render/palette.js';

// Relative luminance and contrast ratio: W3C, Web Content Accessibility Guidelines 2.1,
// definitions "relative luminance" and "contrast ratio"; 3:1 for graphical objects is
// success criterion 1.4.11 (non-text contrast).
function linear(channel: number): number {
  const c = channel / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}
function rgbLinear(hex: string): [number, number, number] {
  return [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16))) as [number, number, number];
}
function luminance(hex: string): number {
  const [r, g, b] = rgbLinear(hex);
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

// Dichromat simulation, Machado, Oliveira & Fernandes, IEEE TVCG 15(6), 2009, severity 1.0
// matrices on linear RGB (values quoted from memory).
const PROTANOPIA = [
  [0.152286, 1.052583, -0.204868],
  [0.114503, 0.786281, 0.099216],
  [-0.003882, -0.048116, 1.051998],
];
const DEUTERANOPIA = [
  [0.367322, 0.860646, -0.227968],
  [0.280085, 0.672501, 0.047413],
  [-0.01182, 0.04294, 0.968881],
];
function simulate(m: number[][], v: [number, number, number]): [number, number, number] {
  return m.map((row) => Math.min(1, Math.max(0, row[0] * v[0] + row[1] * v[1] + row[2] * v[2]))) as [number, number, number];
}
// CIELAB (D65) from linear sRGB; CIE 1976 colour difference.
function lab([r, g, b]: [number, number, number]): [number, number, number] {
  const x = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047;
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  const z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
  const f = (t: number) => (t > 0.008856 ? Math.cbrt(t) : 7.787 * t + 16 / 116);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}
function deltaE(a: [number, number, number], b: [number, number, number]): number {
  const la = lab(a);
  const lb = lab(b);
  return Math.hypot(la[0] - lb[0], la[1] - lb[1], la[2] - lb[2]);
}

describe('palette', () => {
  it('gives every shot colour and every line/marker role at least 3:1 contrast on white (WCAG 2.1, 1.4.11)', () => {
    const lines = [...SHOT_COLOURS, SECTION_COLOURS.ground, SECTION_COLOURS.refractor, SECTION_COLOURS.refractor2, SECTION_COLOURS.geophone, SECTION_COLOURS.shot, SECTION_COLOURS.step, SECTION_COLOURS.velocityChange, INK.alert, GRM_COLOURS.optimum, GRM_COLOURS.other, ...Object.values(METHOD_STYLES).map((m) => m.colour)];
    for (const c of lines) expect(contrast(c, '#ffffff')).toBeGreaterThanOrEqual(3);
  });

  it('draws the refractor with at least 3:1 contrast against both fills it separates', () => {
    expect(contrast(SECTION_COLOURS.refractor, SECTION_COLOURS.layer1Fill)).toBeGreaterThanOrEqual(3);
    expect(contrast(SECTION_COLOURS.refractor, SECTION_COLOURS.layer2Fill)).toBeGreaterThanOrEqual(3);
    expect(contrast(SECTION_COLOURS.refractor2, SECTION_COLOURS.layer3Fill)).toBeGreaterThanOrEqual(3);
  });

  it('keeps every pair of shot colours at least 15 CIELAB units apart in simulated protanopia and deuteranopia', () => {
    for (let i = 0; i < SHOT_COLOURS.length; i++) {
      for (let j = i + 1; j < SHOT_COLOURS.length; j++) {
        const a = rgbLinear(SHOT_COLOURS[i]);
        const b = rgbLinear(SHOT_COLOURS[j]);
        expect(deltaE(simulate(PROTANOPIA, a), simulate(PROTANOPIA, b))).toBeGreaterThanOrEqual(15);
        expect(deltaE(simulate(DEUTERANOPIA, a), simulate(DEUTERANOPIA, b))).toBeGreaterThanOrEqual(15);
      }
    }
  });

  it('keeps the step marker distinguishable from the refractor it sits on, for both deficiencies', () => {
    for (const m of [PROTANOPIA, DEUTERANOPIA]) {
      expect(deltaE(simulate(m, rgbLinear(SECTION_COLOURS.step)), simulate(m, rgbLinear(SECTION_COLOURS.refractor)))).toBeGreaterThanOrEqual(15);
    }
  });
});
