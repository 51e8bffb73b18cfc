import type { Survey } from './survey.js';
import type { Problem } from './problem.js';

export type PickTableImport = { survey: Survey; problems: [] } | { survey: null; problems: Problem[] };

/** STUB — being written: converts a pick table (CSV) to a survey document. */
export function importPickTable(_csvText: string): PickTableImport {
  throw new Error('importPickTable: not yet implemented');
}
