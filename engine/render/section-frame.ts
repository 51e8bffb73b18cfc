/**
 * Scales of the depth section: metres along the line and metres of elevation to page mm.
 * The vertical exaggeration is a drawing choice (how tall the section is on paper), picked
 * from a ladder of round values so the section fills the plot, never below 1:1.
 */
import { linearScale, type LinearScale } from './scale.js';
import { niceExaggerationAtMost } from './ticks.js';
import type { Box } from './label-placer.js';

export interface SectionExtent {
  xMinM: number;
  xMaxM: number;
  /** Highest ground or shot elevation, m. */
  topM: number;
  /** Lowest refractor elevation drawn (or a stand-in when nothing is covered), m. */
  bottomM: number;
}

export interface SectionFrame {
  x: LinearScale;
  elevation: LinearScale;
  /** Vertical mm per metre ÷ horizontal mm per metre. */
  verticalExaggeration: number;
  plot: Box;
}

/** Room kept above the highest ground for shot stars and their names, mm. */
export const HEADROOM_MM = 14;
/** Room kept below the deepest refractor for layer labels, steps and the velocity bar, mm. */
export const FOOTROOM_MM = 27;

export function sectionFrame(extent: SectionExtent, plot: Box): SectionFrame {
  const widthMm = plot.x1 - plot.x0;
  const heightMm = plot.y1 - plot.y0;
  const spanXM = Math.max(1, extent.xMaxM - extent.xMinM) * 1.04;
  const spanZM = Math.max(0.5, extent.topM - extent.bottomM);
  const usableMm = Math.max(10, heightMm - HEADROOM_MM - FOOTROOM_MM);
  const horizontalFit = widthMm / spanXM;
  const verticalFit = usableMm / spanZM;
  const verticalExaggeration = niceExaggerationAtMost(verticalFit / horizontalFit);
  // Where even 1:1 does not fit the height, both scales shrink together.
  const mmPerM = Math.min(horizontalFit, verticalFit / verticalExaggeration);
  const centreX = (extent.xMinM + extent.xMaxM) / 2;
  const halfX = widthMm / mmPerM / 2;
  const verticalMmPerM = mmPerM * verticalExaggeration;
  const top = extent.topM + HEADROOM_MM / verticalMmPerM;
  const bottom = top - heightMm / verticalMmPerM;
  return {
    x: linearScale([centreX - halfX, centreX + halfX], [plot.x0, plot.x1]),
    elevation: linearScale([bottom, top], [plot.y1, plot.y0]),
    verticalExaggeration,
    plot,
  };
}

/** "2:1", "2.5:1". */
export function formatExaggeration(ratio: number): string {
  return `${Number(ratio.toPrecision(6))}:1`;
}
