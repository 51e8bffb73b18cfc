/**
 * Cancelling a drop of seismograph files in real Chromium: Demo A's five SEG-2 files
 * (samples/, invented data) are dropped as a new line, and one upload is held in the
 * browser's network layer (Playwright's request routing) so the test can press Cancel while
 * it is under way, whatever the speed of the machine. The panel shows the files done of
 * the total and the file going; after Cancel it says what is stored (and stays stored), that
 * the file going was not stored and how many were not sent, and the service's own list of
 * lines shows exactly that: no line was created by a cancelled first upload, and a
 * cancelled later upload added no revision. When the service had already stored the file
 * whose answer the cancel cut off, the page asks the service and says so.
 */
import { join, resolve } from 'node:path';
import { mkdir } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page, Route } from 'playwright-core';
import { demoGatherFiles, dropFiles, openArcline, servePageInChromium, type DroppedFile, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun } from './browser.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

/** The gather upload routes: POST api/v1/surveys/gathers?… and api/v1/surveys/:id/gathers?… */
const UPLOAD = /\/api\/v1\/surveys\/(?:[^/?]+\/)?gathers\?/;

interface Listed { id: string; name: string }
interface Line {
  latestRevision: number;
  survey: { shots: { id: string }[] };
  gathers: { shotId: string; revision: number }[];
}

/** The rows of the drop list: file name, state, words. */
function rows(page: Page): Promise<{ name: string; state: string; words: string }[]> {
  return page.$$eval('#drop-list li', (items) =>
    items.map((li) => ({
      name: li.querySelector('.drop-file-name')?.textContent ?? '',
      state: (li as HTMLElement).dataset.state ?? '',
      words: li.querySelector('.drop-file-state')?.textContent ?? '',
    })),
  );
}

/**
 * Holds the `nth` upload (1-based) of the page: `mode` 'before' keeps it from the service
 * (it never arrives), 'after' lets the service answer it (so it is stored) and keeps the
 * answer from the page. `held` resolves when that upload is being held; `release()` lets go.
 */
async function holdUpload(page: Page, nth: number, mode: 'before' | 'after'): Promise<{ held: Promise<void>; release: () => void }> {
  let count = 0;
  let markHeld!: () => void;
  const held = new Promise<void>((r) => (markHeld = r));
  let release!: () => void;
  const released = new Promise<void>((r) => (release = r));
  await page.route(UPLOAD, async (route: Route) => {
    if (route.request().method() !== 'POST' || ++count !== nth) return route.continue();
    const answer = mode === 'after' ? await route.fetch() : null;
    markHeld();
    await released;
    // The page aborted the request meanwhile: finishing it may be refused; either way is fine.
    await (answer === null ? route.abort() : route.fulfill({ response: answer })).catch(() => undefined);
  });
  return { held, release };
}

describe.skipIf(!browserTestsRun)('Cancelling a drop of seismograph files', () => {
  let served: ServedPage;
  const files: DroppedFile[] = [];
  const api = async <T>(path: string): Promise<T> => (await (await fetch(new URL(path, served.baseUrl))).json()) as T;

  beforeAll(async () => {
    await mkdir(SCREENSHOTS, { recursive: true });
    served = await servePageInChromium({ seedDemo: true });
    files.push(...(await demoGatherFiles()));
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('shows files done of the total and the file going; Cancel during the third file keeps the two stored and sends no more', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(served.launched, served.baseUrl);
    // The open line is the seeded pick line (not from files): the drop makes a new line.
    expect(await page.isChecked('#drop-target-new')).toBe(true);
    const before = await api<Listed[]>('api/v1/surveys');
    const { held, release } = await holdUpload(page, 3, 'before');
    await dropFiles(page, files);
    await held;

    await expect.poll(() => page.textContent('#drop-progress-text'), POLL).toBe('2 of 5 files done. Now: demo-line-mid.sg2.');
    expect(await page.isVisible('#drop-cancel')).toBe(true);
    expect(await page.$eval('#drop-progress-bar', (b) => [(b as HTMLProgressElement).value, (b as HTMLProgressElement).max])).toEqual([2, 5]);
    expect((await rows(page)).map((r) => r.state)).toEqual(['stored', 'stored', 'sending', 'waiting', 'waiting']);
    await page.locator('aside.sidebar').screenshot({ path: join(SCREENSHOTS, 'gather-cancel-progress.png') });

    await page.click('#drop-cancel');
    const message = 'Cancelled. demo-line-mid.sg2 was not stored. 2 files are stored and stay stored in the line “demo-line”. 2 files were not sent.';
    await expect.poll(() => page.textContent('#drop-status'), POLL).toBe(message);
    release();
    expect((await rows(page)).map((r) => [r.state, r.words])).toEqual([
      ['stored', 'Stored as shot W-off: 24 of 24 traces picked.'],
      ['stored', 'Stored as shot W-end: 24 of 24 traces picked.'],
      ['cancelled', 'Cancelled: not stored.'],
      ['cancelled', 'Not sent: cancelled.'],
      ['cancelled', 'Not sent: cancelled.'],
    ]);
    expect(await page.isHidden('#drop-progress')).toBe(true);
    expect(await page.isEnabled('#demo-gathers-button')).toBe(true);

    // The service holds what the page says: one new line, of the two files stored before the cancel.
    const after = await api<Listed[]>('api/v1/surveys');
    const made = after.filter((l) => !before.some((b) => b.id === l.id));
    expect(made.map((l) => l.name)).toEqual(['demo-line']);
    const line = await api<Line>(`api/v1/surveys/${made[0].id}`);
    expect(line.latestRevision).toBe(2);
    expect(line.survey.shots.map((s) => s.id)).toEqual(['W-off', 'W-end']);
    expect(line.gathers.map((g) => g.shotId).sort()).toEqual(['W-end', 'W-off']);
    // The line stored so far opens.
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe('demo-line');
    await page.locator('aside.sidebar').screenshot({ path: join(SCREENSHOTS, 'gather-cancel-after.png') });

    await page.unrouteAll({ behavior: 'ignoreErrors' });
    expect(trouble.pageErrors).toEqual([]);
    expect(trouble.cspViolations).toEqual([]);
    expect(trouble.consoleErrors).toEqual([]);
    await context.close();
  });

  it('Cancel during the first file creates no line at all', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(served.launched, served.baseUrl);
    await page.check('#drop-target-new');
    const before = await api<Listed[]>('api/v1/surveys');
    const { held, release } = await holdUpload(page, 1, 'before');
    await dropFiles(page, files);
    await held;
    await expect.poll(() => page.textContent('#drop-progress-text'), POLL).toBe('0 of 5 files done. Now: demo-line-W-off.sg2.');
    await page.click('#drop-cancel');
    await expect.poll(() => page.textContent('#drop-status'), POLL).toBe('Cancelled. demo-line-W-off.sg2 was not stored. Nothing was stored. 4 files were not sent.');
    release();
    expect((await rows(page)).map((r) => r.state)).toEqual(['cancelled', 'cancelled', 'cancelled', 'cancelled', 'cancelled']);
    // No survey was created by the cancelled upload.
    expect(await api<Listed[]>('api/v1/surveys')).toEqual(before);
    await page.unrouteAll({ behavior: 'ignoreErrors' });
    expect(trouble.pageErrors).toEqual([]);
    expect(trouble.cspViolations).toEqual([]);
    expect(trouble.consoleErrors).toEqual([]);
    await context.close();
  });

  it('says so when the service had already stored the file whose answer the cancel cut off', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(served.launched, served.baseUrl);
    await page.check('#drop-target-new');
    await page.fill('#drop-line-name', 'Cut-off answer');
    const before = await api<Listed[]>('api/v1/surveys');
    // The second upload reaches the service (stored as revision 2); its answer is held back.
    const { held, release } = await holdUpload(page, 2, 'after');
    await dropFiles(page, files);
    await held;
    await page.click('#drop-cancel');
    await expect.poll(() => page.textContent('#drop-status'), POLL).toBe(
      'Cancelled. demo-line-W-end.sg2 had already been stored when the cancel reached the service. 2 files are stored and stay stored in the line “Cut-off answer”. 3 files were not sent.',
    );
    release();
    expect((await rows(page)).map((r) => r.state)).toEqual(['stored', 'stored', 'cancelled', 'cancelled', 'cancelled']);
    expect((await rows(page))[1].words).toBe('Stored: the service had finished this file when the cancel reached it.');
    const made = (await api<Listed[]>('api/v1/surveys')).filter((l) => !before.some((b) => b.id === l.id));
    expect(made.map((l) => l.name)).toEqual(['Cut-off answer']);
    const line = await api<Line>(`api/v1/surveys/${made[0].id}`);
    expect(line.latestRevision).toBe(2);
    expect(line.survey.shots.map((s) => s.id)).toEqual(['W-off', 'W-end']);
    await page.unrouteAll({ behavior: 'ignoreErrors' });
    expect(trouble.pageErrors).toEqual([]);
    expect(trouble.cspViolations).toEqual([]);
    expect(trouble.consoleErrors).toEqual([]);
    await context.close();
  });
});
