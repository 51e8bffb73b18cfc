// The engine's public entry: everything server/ and tests may import, by name.
export type * from './survey.js';
export type * from './interpretation.js';
export type { Problem } from './problem.js';
export { SURVEY_LIMITS } from './survey.js';
export { CAUTIONS } from './cautions.js';
export { interpret } from './interpret.js';
