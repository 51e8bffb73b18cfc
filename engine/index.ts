// The engine's public entry: everything server/ and tests may import, by name.
export type * from './survey/survey.js';
export type * from './output/interpretation.js';
export type { Problem } from './survey/problem.js';
export { SURVEY_LIMITS } from './survey/survey.js';
export { CAUTIONS } from './qc/cautions.js';
export { interpret } from './pipeline/interpret.js';
