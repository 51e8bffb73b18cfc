/**
 * The cautions every section, page and interpretation carries (DESIGN.md, "Cautions").
 * One place, so the page, the SVGs and the JSON say the same words.
 */
export const CAUTIONS: readonly string[] = [
  'Depths from seismic refraction are an interpretation, not a measurement: a layer slower than the one above it, or too thin to give first arrivals, is missed, and steps in the refractor are smeared over a width of about the depth.',
  'Check these results against boreholes or test pits, and have them reviewed by a licensed professional under local codes, before anyone designs a foundation, an excavation or a fault setback.',
];
