/**
 * Revisions from the page in real Chromium (store seeded with the demo line): a corrected
 * copy of the open line, pasted and interpreted, is stored as its next revision; the header
 * then says "revision 2 of 2" and a select brings back revision 1 with its own figures,
 * table and downloads. No console errors, no CSP violations.
 */
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Survey } from '../../engine/survey/survey.js';
import { loadedWidth, openArcline, serveDemoLine, type ServedPage } from './served-page.js';
import { DEMO_GATHERS_LINE_NAME } from '../../server/seed.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, type LaunchedBrowser } from './browser.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

interface StoredLineBody {
  name: string;
  revision: number;
  latestRevision: number;
  revisions: { revision: number; name: string }[];
  survey: Survey;
}

describe.skipIf(!browserTestsRun)('Revisions of a stored line from the page', () => {
  let launched: LaunchedBrowser;
  let served: ServedPage;
  let baseUrl: string;
  let demo: Survey;

  beforeAll(async () => {
    ({ served, demo } = await serveDemoLine(SCREENSHOTS));
    ({ baseUrl, launched } = served);
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('stores a corrected pasted line as revision 2 of the open line and shows revision 1 again on request', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);

    // The seeded demo line opens with one revision: no select, nothing to store as a revision yet.
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await page.textContent('#revision-text')).toBe('revision 1 of 1');
    expect(await page.isVisible('#revision-select')).toBe(false);
    expect(await page.isVisible('#revise-button')).toBe(false);
    // The two seeded lines (server/seed.ts): the demo pick line, newest, opens first; then the line of its seismograph files.
    const listed = (await (await page.request.get(new URL('api/v1/surveys', baseUrl).href)).json()) as { id: string; name: string }[];
    expect(listed.map((l) => l.name)).toEqual([demo.name, DEMO_GATHERS_LINE_NAME]);
    const id = listed[0]!.id;

    // The corrected line: one pick moved by 1.5 ms and a new name (test data, invented).
    const corrected = structuredClone(demo);
    corrected.name = `${demo.name} (pick corrected)`;
    const shot = corrected.shots[0]!;
    const originalPickMs = shot.times[4] as number;
    shot.times[4] = Math.round((originalPickMs + 1.5) * 10) / 10;

    await page.fill('#survey-text', JSON.stringify(corrected, null, 2));
    await page.click('#interpret-button');
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
    await page.locator('#revise-button').waitFor({ state: 'visible' });
    expect(await page.textContent('#revise-button')).toBe(`Store as revision of ${demo.name}`);
    expect(await page.isVisible('#revision-row')).toBe(false);
    await page.screenshot({ path: join(SCREENSHOTS, 'revisions-offer.png') });

    const stored = page.waitForResponse((r) => r.url().endsWith(`/api/v1/surveys/${id}/revisions`) && r.request().method() === 'POST');
    await page.click('#revise-button');
    const response = await stored;
    expect(response.status()).toBe(201);
    expect(response.request().headers()['content-type']).toContain('application/json');
    expect(JSON.parse(response.request().postData() ?? '{}')).toEqual(corrected);

    // The page opens the stored line at its new revision.
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe('revision 2 of 2');
    expect(await page.textContent('#line-title')).toBe(corrected.name);
    expect(await page.textContent('#line-badge')).toBe('Stored');
    expect(await page.isVisible('#revise-button')).toBe(false);
    expect(await page.isVisible('#revision-select')).toBe(true);
    expect(await page.inputValue('#revision-select')).toBe('2');
    expect(await page.locator('#revision-select option').count()).toBe(2);
    expect(await page.getAttribute('#section-image', 'src')).toBe(`api/v1/surveys/${id}/section.svg?revision=2`);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await page.locator('#stored-list li').count()).toBe(2);

    // The API keeps both: revision 2 holds the corrected pick, revision 1 the original.
    const latest = (await (await page.request.get(new URL(`api/v1/surveys/${id}`, baseUrl).href)).json()) as StoredLineBody;
    expect(latest.revisions).toHaveLength(2);
    expect(latest.latestRevision).toBe(2);
    expect(latest.name).toBe(corrected.name);
    expect(latest.survey.shots[0]!.times[4]).toBe(shot.times[4]);
    expect(latest.survey.shots[0]!.times[4]).not.toBe(originalPickMs);

    // Revision 1 from the select: its name, figures, table and downloads.
    await page.selectOption('#revision-select', '1');
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe('revision 1 of 2');
    expect(await page.textContent('#line-title')).toBe(demo.name);
    expect(await page.getAttribute('#section-image', 'src')).toBe(`api/v1/surveys/${id}/section.svg?revision=1`);
    expect(await page.getAttribute('#traveltimes-image', 'src')).toBe(`api/v1/surveys/${id}/traveltimes.svg?revision=1`);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    expect(await page.locator('#station-body tr').count()).toBe(demo.geophones.length);
    for (const link of ['download-section', 'download-traveltimes', 'download-stations', 'download-interpretation', 'download-section-pdf', 'download-traveltimes-png']) {
      const href = await page.getAttribute('#' + link, 'href');
      expect(href).toMatch(/\?revision=1$/);
      expect((await page.request.get(new URL(href!, baseUrl).href)).status(), href!).toBe(200);
    }
    const first = (await (await page.request.get(new URL(`api/v1/surveys/${id}?revision=1`, baseUrl).href)).json()) as StoredLineBody;
    expect(first.survey.shots[0]!.times[4]).toBe(originalPickMs);
    expect(page.url()).toContain('&revision=1');
    await page.screenshot({ path: join(SCREENSHOTS, 'revisions.png'), fullPage: true });

    // The select answers the keyboard: focused, ArrowDown goes back to revision 2.
    await page.focus('#revision-select');
    await page.keyboard.press('ArrowDown');
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe('revision 2 of 2');
    expect(await page.textContent('#line-title')).toBe(corrected.name);

    // A reload of the address of revision 1 opens revision 1.
    await page.goto(new URL(`#line=${encodeURIComponent(id)}&revision=1`, baseUrl).href);
    await page.reload();
    await page.waitForSelector('body[data-ready="true"]');
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe('revision 1 of 2');
    expect(await page.textContent('#line-title')).toBe(demo.name);

    expect(trouble.pageErrors).toEqual([]);
    expect(trouble.cspViolations).toEqual([]);
    expect(trouble.consoleErrors, `responses with errors: ${trouble.badResponses.join(', ') || 'none'}`).toEqual([]);
    await context.close();
  });
});
