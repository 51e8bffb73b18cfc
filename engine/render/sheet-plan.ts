/**
 * How a line goes onto sheets at a fixed drawing scale: the horizontal scale 1:n, the
 * vertical exaggeration, and the stretch of chainage each sheet shows, with match lines at
 * round chainages where one sheet ends and the next begins. A line is paged, never squeezed:
 * every sheet is drawn at the same stated scale. O(G log G) for G geophones (a median).
 */
import type { PaperName } from './page.js';
import { niceStep } from './ticks.js';
import { AUTO_EXAGGERATIONS, ISO_SCALES, MIN_GEOPHONE_SPACING_MM, SHEET_LIMITS, type ResolvedSheetOptions, type SheetOptionProblem } from './sheet-options.js';
import { fixed, groupThousands } from './format.js';

/** What is to be drawn, in metres. */
export interface SheetExtent {
  /** Chainage of the first and last geophone or shot, m. */
  fromM: number;
  toM: number;
  /** Chainage of the first and last geophone, m: the spread, which the sheets must show. */
  spreadFromM: number;
  spreadToM: number;
  /** Highest ground or shot elevation and lowest elevation drawn (refractors, bands, limits), m. */
  topM: number;
  bottomM: number;
  /** Geophone chainages, m, increasing. */
  geophoneXs: readonly number[];
}

/** Room of the plot on one sheet, mm. */
export interface PlotRoom {
  widthMm: number;
  heightMm: number;
}

/** Room kept above the highest ground for shot stars and their names, mm. */
export const SHEET_HEADROOM_MM = 14;
/** Room kept below the deepest line drawn for the layer label and step labels, mm. */
export const SHEET_FOOTROOM_MM = 9;
/** Paper left clear beyond the first and last geophone or shot, mm (a shot's star and name). */
export const LINE_END_PAD_MM = 8;

export interface SheetWindow {
  fromM: number;
  toM: number;
}

export interface SheetPlan {
  paper: PaperName;
  /** n of the horizontal scale 1:n. */
  scale: number;
  verticalExaggeration: number;
  /** Plot mm per metre along the line (1000 / n) and per metre of elevation. */
  mmPerM: number;
  verticalMmPerM: number;
  /** Elevation at the top of every sheet's plot, m (the same on every sheet, so sheets line up). */
  topElevationM: number;
  /**
   * Height of the plot, mm: what the section needs (headroom, highest ground to deepest line
   * drawn, footroom), never more, so a shallow section is not drawn over a sheet of empty
   * lower layer; the rows and legend follow it up the sheet.
   */
  plotHeightMm: number;
  /** Chainage shown by each sheet; consecutive sheets meet at a match line. */
  windows: SheetWindow[];
}

function verticalNeedMm(extent: SheetExtent, verticalMmPerM: number): number {
  return SHEET_HEADROOM_MM + Math.max(0.5, extent.topM - extent.bottomM) * verticalMmPerM + SHEET_FOOTROOM_MM;
}

function median(values: number[]): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** The median geophone spacing, m (NaN with fewer than two geophones). */
export function medianSpacingM(geophoneXs: readonly number[]): number {
  const gaps: number[] = [];
  for (let i = 1; i < geophoneXs.length; i++) gaps.push(geophoneXs[i] - geophoneXs[i - 1]);
  return median(gaps.filter((g) => g > 0));
}

/** Span of the line on paper at 1:n with its end pads, mm. */
function lineSpanMm(extent: SheetExtent, n: number): number {
  return (Math.max(1, extent.toM - extent.fromM) * 1000) / n + 2 * LINE_END_PAD_MM;
}

/**
 * The auto scale (SECTION_SHEET_DEFAULTS): the largest ISO 5455 scale fitting the line on one
 * sheet, or, when that would set geophones closer than MIN_GEOPHONE_SPACING_MM, the largest
 * that keeps them apart; never so large that the section's height does not fit at `exaggeration`.
 */
export function chooseScale(extent: SheetExtent, room: PlotRoom, exaggeration: number): number {
  const spacingM = medianSpacingM(extent.geophoneXs);
  const last = ISO_SCALES[ISO_SCALES.length - 1];
  const nOne = ISO_SCALES.find((n) => lineSpanMm(extent, n) <= room.widthMm) ?? last;
  const apart = ISO_SCALES.filter((n) => !Number.isFinite(spacingM) || (spacingM * 1000) / n >= MIN_GEOPHONE_SPACING_MM);
  const nSpacing = apart.length > 0 ? apart[apart.length - 1] : ISO_SCALES[0];
  const nVert = ISO_SCALES.find((n) => verticalNeedMm(extent, (1000 / n) * exaggeration) <= room.heightMm) ?? last;
  return Math.max(nVert, Math.min(nOne, nSpacing));
}

/** Sheet windows at 1:n: one centred window if the line fits, else windows meeting at round chainages. */
export function sheetWindows(extent: SheetExtent, room: PlotRoom, n: number, maxSheets: number): SheetWindow[] | null {
  const padM = (LINE_END_PAD_MM * n) / 1000;
  const start = extent.fromM - padM;
  const end = Math.max(extent.toM, extent.fromM + 1) + padM;
  const sheetM = (room.widthMm * n) / 1000;
  if (end - start <= sheetM) {
    const centre = (start + end) / 2;
    return [{ fromM: centre - sheetM / 2, toM: centre + sheetM / 2 }];
  }
  // As few sheets as the paper allows, of about equal length (no sliver of a last sheet),
  // meeting at match lines on multiples of a round step (1, 2, 5 × 10ⁿ m, about a tenth of a
  // sheet), or of a finer step where rounding would overfill a sheet.
  const count = Math.ceil((end - start) / sheetM - 1e-9);
  if (count > maxSheets) return null;
  const round = niceStep(sheetM, 10);
  for (const step of [round, round / 2, round / 5, round / 10, 0]) {
    const matches = [start];
    for (let k = 1; k < count; k++) {
      const even = start + ((end - start) * k) / count;
      matches.push(step > 0 ? Math.round(even / step) * step : even);
    }
    matches.push(end);
    const fits = matches.every((m, k) => k === 0 || (m > matches[k - 1] && m - matches[k - 1] <= sheetM + 1e-9));
    if (fits) return matches.slice(1).map((to, k) => ({ fromM: matches[k], toM: to }));
  }
  return null;
}

export function planSheets(extent: SheetExtent, room: PlotRoom, options: ResolvedSheetOptions): { plan: SheetPlan } | { problems: SheetOptionProblem[] } {
  const paper = options.paper;
  const fixedVe = options.verticalExaggeration === 'auto' ? null : options.verticalExaggeration;
  // Shots off the ends are drawn in place when that costs no extra sheet, else the sheets
  // show the spread and such shots are named at the sheet's edge.
  const spread: SheetExtent = { ...extent, fromM: extent.spreadFromM, toM: extent.spreadToM };
  let n = options.scale === 'auto' ? chooseScale(spread, room, fixedVe ?? 1) : options.scale;
  if (options.scale === 'auto') {
    // "auto" never refuses a line: past the sheet cap it takes the next smaller series scale.
    while (sheetWindows(spread, room, n, SHEET_LIMITS.maxSheets) === null && n < ISO_SCALES[ISO_SCALES.length - 1]) n = ISO_SCALES.find((m) => m > n) ?? n;
  }
  const sheetsFor = (e: SheetExtent) => Math.ceil(lineSpanMm(e, n) / room.widthMm - 1e-9);
  const shown = sheetsFor(extent) <= sheetsFor(spread) ? extent : spread;
  const mmPerM = 1000 / n;
  const depthRangeM = Math.max(0.5, extent.topM - extent.bottomM);
  let ve: number;
  if (fixedVe !== null) {
    ve = fixedVe;
  } else {
    const fits = AUTO_EXAGGERATIONS.filter((e) => verticalNeedMm(extent, mmPerM * e) <= room.heightMm);
    ve = fits.length > 0 ? fits[fits.length - 1] : 1;
  }
  const needMm = verticalNeedMm(extent, mmPerM * ve);
  const problems: SheetOptionProblem[] = [];
  if (needMm > room.heightMm + 1e-9) {
    const field = fixedVe !== null ? 'verticalExaggeration' : 'scale';
    problems.push(
        {
          field,
          message:
            `at 1:${groupThousands(n)} with vertical exaggeration ${fixed(ve, ve % 1 === 0 ? 0 : 1)}:1 the section (${fixed(depthRangeM, 1)} m from the highest ground to the deepest line drawn) needs ${fixed(needMm, 0)} mm of height, and the ${paper} sheet has ${fixed(room.heightMm, 0)} mm: ` +
            `choose a smaller scale (a larger n), a smaller exaggeration${paper === 'A4' ? ' or A3 paper' : ''}`,
        },
    );
  }
  const windows = sheetWindows(shown, room, n, SHEET_LIMITS.maxSheets);
  if (windows === null) {
    const needed = Math.ceil(lineSpanMm(shown, n) / room.widthMm);
    problems.push(
        {
          field: 'scale',
          message: `at 1:${groupThousands(n)} the line (${fixed(shown.toM - shown.fromM, 0)} m) needs about ${needed} ${paper} sheets, more than the ${SHEET_LIMITS.maxSheets} allowed: choose a smaller scale (a larger n)${paper === 'A4' ? ' or A3 paper' : ''}`,
        },
    );
  }
  if (problems.length > 0 || windows === null) return { problems };
  const verticalMmPerM = mmPerM * ve;
  return {
    plan: { paper, scale: n, verticalExaggeration: ve, mmPerM, verticalMmPerM, topElevationM: extent.topM + SHEET_HEADROOM_MM / verticalMmPerM, plotHeightMm: Math.min(room.heightMm, verticalNeedMm(extent, verticalMmPerM)), windows },
  };
}
