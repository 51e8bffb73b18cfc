/**
 * The page's write token in real Chromium: a service started with a write token refuses
 * Store from the page until the token is entered, then accepts it; the token is kept for
 * the tab (sessionStorage) across a reload.
 */
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Survey } from '../../engine/survey/survey.js';
import { openArcline, SAMPLES_DIR, servePageInChromium, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, type LaunchedBrowser } from './browser.js';

// Invented for this test only.
const WRITE_TOKEN = 'e2e-token-4f9c2a71-b03d6e58a9c41f27';

describe.skipIf(!browserTestsRun)('Arcline page with a write token', () => {
  let launched: LaunchedBrowser;
  let served: ServedPage;
  let baseUrl: string;
  let demoText: string;
  let demo: Survey;

  beforeAll(async () => {
    demoText = await readFile(join(SAMPLES_DIR, 'demo-line.json'), 'utf8');
    demo = JSON.parse(demoText) as Survey;
    served = await servePageInChromium({ writeToken: WRITE_TOKEN });
    ({ baseUrl, launched } = served);
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('refuses Store without the token, stores with it, and keeps the token for the tab', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    // An empty store says so.
    expect(await page.isVisible('#stored-empty')).toBe(true);

    await page.fill('#survey-text', demoText);
    const refused = page.waitForResponse((r) => r.url().endsWith('/api/v1/surveys') && r.request().method() === 'POST');
    await page.click('#store-button');
    const refusal = await refused;
    expect(refusal.status()).toBe(401);
    expect(refusal.request().headers().authorization).toBeUndefined();
    const refusalBody = (await refusal.json()) as { error: { message: string } };
    await page.locator('#error-box').waitFor({ state: 'visible' });
    expect(await page.textContent('#error-box')).toContain(refusalBody.error.message);
    expect(await page.locator('#stored-list li').count()).toBe(0);

    await page.click('.token summary');
    await page.fill('#write-token', WRITE_TOKEN);
    const accepted = page.waitForResponse((r) => r.url().endsWith('/api/v1/surveys') && r.request().method() === 'POST');
    await page.click('#store-button');
    const acceptance = await accepted;
    expect(acceptance.status()).toBe(201);
    expect(acceptance.request().headers().authorization).toBe(`Bearer ${WRITE_TOKEN}`);
    await page.waitForSelector('#share-panel:not([hidden])');
    expect(await page.isVisible('#error-box')).toBe(false);
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await page.locator('#stored-list li').count()).toBe(1);

    // Same tab after a reload: the token is still there; a fresh context has none.
    // The line opens again with its share link: the page reads it with the token (only a
    // writer is shown a share link); a tab without the token opens the line without it.
    const sharePath = new URL(await page.inputValue('#share-url')).pathname;
    await page.reload();
    await page.waitForSelector('body[data-ready="true"]');
    expect(await page.inputValue('#write-token')).toBe(WRITE_TOKEN);
    await page.waitForSelector('#share-panel:not([hidden])');
    expect(new URL(await page.inputValue('#share-url')).pathname).toBe(sharePath);
    const other = await launched.freshContext();
    const otherPage = await other.newPage();
    const readerRead = otherPage.waitForResponse((r) => /\/api\/v1\/surveys\/[^/?]+$/.test(new URL(r.url()).pathname) && r.request().method() === 'GET');
    await otherPage.goto(baseUrl);
    await otherPage.waitForSelector('body[data-ready="true"]');
    expect(await otherPage.inputValue('#write-token')).toBe('');
    const read = await readerRead;
    expect(read.request().headers().authorization).toBeUndefined();
    expect(((await read.json()) as { shareUrl: unknown }).shareUrl).toBeNull();
    await expect.poll(() => otherPage.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await otherPage.isHidden('#share-panel')).toBe(true);
    await other.close();

    // Chromium logs the refused POST (401) as a console error; nothing else may appear.
    expect(trouble.pageErrors).toEqual([]);
    expect(trouble.cspViolations).toEqual([]);
    expect(trouble.consoleErrors.filter((t) => !/status of 401/.test(t)), trouble.badResponses.join(', ')).toEqual([]);
    await context.close();
  });
});
