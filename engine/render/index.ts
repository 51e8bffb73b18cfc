/**
 * SVG drawings of an interpretation: the depth section and the time–distance plot.
 * Pure: strings out, no I/O; each render builds its own svgdom document.
 */
export { renderSection, type SectionOptions } from './section.js';
export { renderTravelTimes, type TravelTimeOptions } from './travel-times.js';
