/**
 * SVG drawings of an interpretation: the depth section and the time–distance plot.
 * Pure: strings out, no I/O; each render builds its own svgdom document.
 */
export { renderSection, renderSectionSheet, renderSectionSheets, sectionSheetCount, type SectionOptions } from './section.js';
export {
  sectionSheetOptionProblems,
  parseSectionSheetOptions,
  SectionSheetError,
  SECTION_SHEET_DEFAULTS,
  SHEET_LIMITS,
  type SectionSheetOptions,
  type SheetOptionProblem,
} from './sheet-options.js';
export { renderTravelTimes, type TravelTimeOptions } from './travel-times.js';
