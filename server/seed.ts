/**
 * Demo seeding: an empty store gets the invented demo line as its first survey, so a
 * fresh `npm start` shows something. The demo module is loaded only when seeding.
 */
import { validateSurvey } from '../engine/survey/validate.js';
import type { SurveyStore } from './store.js';
import type { ComputePool } from './compute/pool.js';

/** Stores demoLine() when the store is empty; returns the new id, or null when nothing was stored. */
export async function seedDemoLine(store: SurveyStore, compute: ComputePool): Promise<string | null> {
  if (!store.isEmpty()) return null;
  const { demoLine } = await import('../engine/samples/demo-lines.js');
  // The demo goes through the same checks as any upload, so a broken demo fails loudly.
  const { survey, problems } = validateSurvey(demoLine());
  if (survey === null) throw new Error(`The demo line is not a valid survey: ${problems[0]?.path} ${problems[0]?.message}`);
  const { summary } = store.createSurvey(survey, await compute.run('interpret', { survey }));
  return summary.id;
}
