/**
 * The revision guard from the page in real Chromium (store seeded with the demo lines): with
 * the demo line open, another line (Demo B, another geophone layout) interpreted and offered
 * "Store as revision" is refused by the service (api-v1.md: 409 unless the request says the
 * change is meant; nothing stored) and the page asks, showing the service's own description
 * of the change word for word (one text, from one place). Cancel stores nothing; "Store as a
 * new line" stores Demo B beside Demo A, which keeps its one revision; "Store as revision
 * anyway" sends the confirmation. No console errors beyond the provoked 409, no CSP violations.
 */
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page, Request } from 'playwright-core';
import type { Survey } from '../../engine/survey/survey.js';
import { openArcline, SAMPLES_DIR, serveDemoLine, type ServedPage } from './served-page.js';
import { DEMO_GATHERS_LINE_NAME } from '../../server/seed.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, type LaunchedBrowser, type PageTrouble } from './browser.js';
import { LAYOUT_CHANGE_CONFIRMATION } from '../../web/api.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

function expectNoTrouble(trouble: PageTrouble, allowedConsole: RegExp[] = []): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(trouble.consoleErrors.filter((text) => !allowedConsole.some((re) => re.test(text))), trouble.badResponses.join(', ')).toEqual([]);
}

/** Every POST the page makes to the API, from now on. */
function recordPosts(page: Page): Request[] {
  const posts: Request[] = [];
  page.on('request', (r) => {
    if (r.method() === 'POST' && r.url().includes('/api/v1/')) posts.push(r);
  });
  return posts;
}

async function listed(page: Page, baseUrl: string): Promise<{ id: string; name: string }[]> {
  return (await (await page.request.get(new URL('api/v1/surveys', baseUrl).href)).json()) as { id: string; name: string }[];
}

async function revisionsOf(page: Page, baseUrl: string, id: string): Promise<number> {
  const body = (await (await page.request.get(new URL(`api/v1/surveys/${id}`, baseUrl).href)).json()) as { latestRevision: number };
  return body.latestRevision;
}

/** Loads a sample through the file input and interprets it; waits for the revise offer. */
async function interpretFile(page: Page, file: string): Promise<void> {
  await page.setInputFiles('#file-input', join(SAMPLES_DIR, file));
  await expect.poll(() => page.textContent('#format-name'), POLL).toContain(file);
  await page.click('#interpret-button');
  await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
  await page.locator('#revise-button').waitFor({ state: 'visible' });
}

describe.skipIf(!browserTestsRun)('Storing another geophone layout as a revision', () => {
  let launched: LaunchedBrowser;
  let served: ServedPage;
  let baseUrl: string;
  let demo: Survey;
  let flat: Survey;
  /** The seeded demo line (its latest revision becomes Demo B in the second test). */
  let demoId: string;

  beforeAll(async () => {
    ({ served, demo, flat } = await serveDemoLine(SCREENSHOTS));
    ({ baseUrl, launched } = served);
    // The two seeded lines (server/seed.ts): the demo pick line, newest, first; then the line of its seismograph files.
    const seeded = (await (await fetch(new URL('api/v1/surveys', baseUrl))).json()) as { id: string; name: string }[];
    expect(seeded.map((l) => l.name)).toEqual([demo.name, DEMO_GATHERS_LINE_NAME]);
    demoId = seeded[0].id;
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('asks before storing, shows the service\'s words for the change, stores nothing on Cancel and stores a new line when asked to', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    const demoLine = { id: demoId };
    const posts = recordPosts(page);

    await interpretFile(page, 'flat-line.csv');
    expect(await page.textContent('#revise-button')).toBe(`Store as revision of ${demo.name}`);
    const refused = page.waitForResponse((r) => r.url().includes(`/api/v1/surveys/${demoLine.id}/revisions`));
    await page.click('#revise-button');
    const conflict = await refused;
    expect(conflict.status()).toBe(409);
    expect(new URL(conflict.url()).search).toBe('');
    const description = ((await conflict.json()) as { error: { layoutChange: { description: string } } }).error.layoutChange.description;

    // The question, with what changes in the service's words: both layouts are 24 geophones,
    // Demo A 0–69 m every 3 m, Demo B 0–46 m every 2 m.
    const dialog = page.locator('#layout-dialog');
    await dialog.waitFor({ state: 'visible' });
    expect(await page.textContent('#layout-dialog-change')).toBe(description);
    expect(description).toContain(`24 geophones from x = ${flat.geophones[0].x} m to ${flat.geophones.at(-1)!.x} m, every 2 m`);
    expect(description).toContain(`24 geophones from x = ${demo.geophones[0].x} m to ${demo.geophones.at(-1)!.x} m, every 3 m`);
    expect(description).toContain('23 of the 24 geophones are at other positions');
    const previews = posts.length;
    expect(await page.textContent('#layout-confirm')).toBe(`Store as revision of “${demo.name}” anyway`);
    // The safe answer has the focus, so Enter cannot put another line under Demo A's link.
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('layout-new-line');
    await page.screenshot({ path: join(SCREENSHOTS, 'revision-guard-question.png') });

    await page.click('#layout-cancel');
    await dialog.waitFor({ state: 'hidden' });
    expect(posts.length, 'Cancel sends nothing more').toBe(previews);
    expect(await revisionsOf(page, baseUrl, demoLine.id)).toBe(1);
    expect(await page.textContent('#status')).toBe('Nothing stored.');

    // Asked again, the user stores Demo B as a line of its own.
    await page.click('#revise-button');
    await dialog.waitFor({ state: 'visible' });
    const created = page.waitForResponse((r) => r.url().endsWith('/api/v1/surveys') && r.request().method() === 'POST');
    await page.click('#layout-new-line');
    expect((await created).status()).toBe(201);
    // The preview already carried Demo B's name: wait for the stored line to open.
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Stored');
    expect(await page.textContent('#line-title')).toBe(flat.name);
    const lines = await listed(page, baseUrl);
    expect(lines.map((l) => l.name).sort()).toEqual([demo.name, DEMO_GATHERS_LINE_NAME, flat.name].sort());
    // Demo A is untouched: one revision, its own layout; the only revision request was the refused one.
    expect(await revisionsOf(page, baseUrl, demoLine.id)).toBe(1);
    expect(posts.filter((r) => r.url().includes('/revisions')).map((r) => new URL(r.url()).search)).toEqual(['', '']);
    expectNoTrouble(trouble, [/status of 409/]);
    await context.close();
  });

  it('sends the confirmation only when the user agrees to the change', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    const demoLine = { id: demoId };
    await page.click(`#stored-list button[data-line-id="${demoLine.id}"]`);
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    const before = await revisionsOf(page, baseUrl, demoLine.id);

    await interpretFile(page, 'flat-line.csv');
    await page.click('#revise-button');
    await page.locator('#layout-dialog').waitFor({ state: 'visible' });
    const stored = page.waitForResponse((r) => r.url().includes(`/api/v1/surveys/${demoLine.id}/revisions`) && r.request().method() === 'POST');
    await page.click('#layout-confirm');
    const response = await stored;
    expect(new URL(response.url()).search).toBe(`?${LAYOUT_CHANGE_CONFIRMATION}`);
    expect(response.status()).toBe(201);
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe(`revision ${before + 1} of ${before + 1}`);
    expect(await revisionsOf(page, baseUrl, demoLine.id)).toBe(before + 1);
    expectNoTrouble(trouble, [/status of 409/]);
    await context.close();
  });

  it('shows whatever the service says changed, and never a text of its own', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    const demoLine = { id: demoId };
    await page.click(`#stored-list button[data-line-id="${demoLine.id}"]`);
    await page.waitForFunction((id) => document.querySelector(`#stored-list button[data-line-id="${id}"]`)?.getAttribute('aria-current') === 'true', demoLine.id);
    const latest = await revisionsOf(page, baseUrl, demoLine.id);
    const stored = (await (await page.request.get(new URL(`api/v1/surveys/${demoLine.id}`, baseUrl).href)).json()) as { survey: Survey };

    // The latest revision with one pick moved: the same layout, which the service would take.
    const corrected = structuredClone(stored.survey);
    corrected.shots[0].times[4] = Math.round(((corrected.shots[0].times[4] as number) + 1.5) * 10) / 10;
    await page.fill('#survey-text', JSON.stringify(corrected, null, 2));
    await page.click('#interpret-button');
    await page.locator('#revise-button').waitFor({ state: 'visible' });

    // The service's answer is played by the test, in the contract's shape: 409 with a description
    // no page code could have composed. The page must show exactly that sentence.
    const description = 'Test wording 7f3a: the service alone says what changes.';
    const seen: string[] = [];
    await page.route(`**/api/v1/surveys/${demoLine.id}/revisions*`, async (route) => {
      seen.push(new URL(route.request().url()).search);
      if (!route.request().url().includes(LAYOUT_CHANGE_CONFIRMATION)) {
        const error = { code: 'layout_changed', message: `${description} Nothing was stored.`, path: '/geophones', layoutChange: { description } };
        await route.fulfill({ status: 409, contentType: 'application/json', body: JSON.stringify({ error }) });
      } else {
        await route.continue();
      }
    });
    await page.click('#revise-button');
    await page.locator('#layout-dialog').waitFor({ state: 'visible' });
    expect(await page.textContent('#layout-dialog-change')).toBe(description);
    await page.click('#layout-confirm');
    await expect.poll(() => page.textContent('#revision-text'), POLL).toBe(`revision ${latest + 1} of ${latest + 1}`);
    expect(seen).toEqual(['', `?${LAYOUT_CHANGE_CONFIRMATION}`]);
    expectNoTrouble(trouble, [/status of 409/]);
    await context.close();
  });
});
