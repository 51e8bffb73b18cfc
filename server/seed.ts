/**
 * Demo seeding: an empty store gets two invented lines, so a fresh `npm start` shows
 * something to interpret and something to review:
 *  - Demo A as a pick line (engine/samples/demo-lines.ts), through the survey check like any upload;
 *  - Demo A from its seismograph files (engine/samples/demo-gathers.ts: the bytes of
 *    samples/demo-line-*.sg2, which tests/engine/demo-gathers.test.ts holds equal), built
 *    shot by shot through the upload's own steps (server/gather-upload.ts: pick, make the
 *    line, check, interpret), so its gathers and automatic picks are reviewed on the page
 *    exactly as an uploaded line's are.
 * Everything is computed first; then both lines (the gathers line's five revisions with
 * their files) are written in one transaction, in which the store is checked empty again:
 * both lines or nothing, never a half seed. The demo modules are loaded only when seeding.
 */
import { validateSurvey } from '../engine/survey/validate.js';
import type { Survey } from '../engine/survey/survey.js';
import type { SurveyStore } from './store.js';
import type { ComputePool } from './compute/pool.js';
import { lineWithGather, newLineFromGather, pickGather, type PreparedGatherLine } from './gather-upload.js';

/** The name of the line seeded from the demo's seismograph files (the page's demo button uses the same). */
export const DEMO_GATHERS_LINE_NAME = 'Demo A from seismograph files';

/** The ids of the seeded lines. */
export interface SeededDemo {
  /** Demo A as a pick line. */
  lineId: string;
  /** Demo A from its seismograph files: one revision per shot, each with its file. */
  gathersId: string;
}

/** One shot of the gathers line, ready to store: its file and the line after it. */
interface PreparedShot {
  bytes: Uint8Array;
  line: PreparedGatherLine;
}

/**
 * Stores both demo lines when the store is empty; null when it was not (nothing stored).
 * Throws (storing nothing) when a demo fails the checks. Cost: five picks and six
 * interpretations in the pool, once per empty store.
 */
export async function seedDemoLines(store: SurveyStore, compute: ComputePool): Promise<SeededDemo | null> {
  if (!store.isEmpty()) return null;
  const [{ demoLine }, { demoGathers }] = await Promise.all([import('../engine/samples/demo-lines.js'), import('../engine/samples/demo-gathers.js')]);
  // The demo goes through the same checks as any upload, so a broken demo fails loudly.
  const { survey, problems } = validateSurvey(demoLine());
  if (survey === null) throw new Error(`The demo line is not a valid survey: ${problems[0]?.path} ${problems[0]?.message}`);
  const interpretation = await compute.run('interpret', { survey });

  // Shot by shot, each on the line the one before made, as the page's uploads go. O(shots).
  const shots: PreparedShot[] = [];
  let previous: Survey | null = null;
  for (const gather of demoGathers()) {
    const picks = await pickGather(compute, gather.bytes, {});
    const line: PreparedGatherLine =
      previous === null
        ? await newLineFromGather(compute, picks, { shotId: gather.shotId, name: DEMO_GATHERS_LINE_NAME })
        : await lineWithGather(compute, { revision: shots.length, name: DEMO_GATHERS_LINE_NAME, survey: previous }, picks, { shotId: gather.shotId, confirmLayout: false });
    shots.push({ bytes: gather.bytes, line });
    previous = line.survey;
  }
  if (shots.length === 0) throw new Error('The demo has no seismograph files.');

  return store.inOneTransaction((): SeededDemo | null => {
    // Another process on the same data folder may have stored a line meanwhile.
    if (!store.isEmpty()) return null;
    // The gathers line first, so the pick line is the newest and opens first on the page, as before.
    const [first, ...rest] = shots;
    const gathersId = store.createSurvey(first.line.survey, first.line.interpretation, { gather: { shotId: first.line.shotId, seg2: first.bytes, overrides: {} } }).summary.id;
    rest.forEach((shot, i) => {
      const written = store.addRevision(gathersId, shot.line.survey, shot.line.interpretation, { gather: { shotId: shot.line.shotId, seg2: shot.bytes, overrides: {} } }, i + 1);
      if (written === null) throw new Error(`The demo gathers line could not take shot ${shot.line.shotId} as revision ${i + 2}.`);
    });
    const lineId = store.createSurvey(survey, interpretation).summary.id;
    return { lineId, gathersId };
  });
}
