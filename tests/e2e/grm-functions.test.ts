/**
 * The GRM functions on the page, in real Chromium (issue 13 item 3): a line asking for
 * options.method "grm" shows a third figure, the functions of every XY (Palmer 1980), in
 * the preview and once stored; a plus-minus line does not show it. The demo line
 * (samples/demo-line.json, closed-form first arrivals) with the method set.
 */
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serveDemoLine, openArcline, loadedWidth, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, type PageTrouble } from './browser.js';
import type { Survey } from '../../engine/survey/survey.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

function expectNoTrouble(trouble: PageTrouble): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(trouble.consoleErrors, trouble.badResponses.join(', ')).toEqual([]);
}

describe.skipIf(!browserTestsRun)('GRM functions on the page', () => {
  let served: ServedPage;
  let demo: Survey;
  beforeAll(async () => {
    ({ served, demo } = await serveDemoLine(SCREENSHOTS));
  }, BROWSER_TEST_TIMEOUT_MS);
  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('shows them for a GRM line (preview and stored) and not for a plus-minus one', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(served.launched, served.baseUrl);
    const grmLine = { ...demo, name: 'Demo, GRM', options: { ...(demo.options ?? {}), method: 'grm' as const } };
    await page.fill('#survey-text', JSON.stringify(grmLine));
    await page.click('#interpret-button');
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
    await page.locator('#grm-figure').waitFor({ state: 'visible' });
    expect(await page.getAttribute('#grm-image', 'src')).toMatch(/^blob:/);
    expect(await loadedWidth(page, '#grm-image')).toBeGreaterThan(0);
    await page.locator('#grm-figure').screenshot({ path: resolve(SCREENSHOTS, 'grm-functions.png') });

    await page.fill('#survey-text', JSON.stringify({ ...demo, name: 'Demo, plus-minus' }));
    await page.click('#interpret-button');
    await expect.poll(() => page.locator('#grm-figure').isHidden(), POLL).toBe(true);

    const stored = await fetch(new URL('api/v1/surveys', served.baseUrl), { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(grmLine) });
    expect(stored.status).toBe(201);
    const { id } = (await stored.json()) as { id: string };
    // A fresh load of the page opening the stored line (a hash change alone is not a reload).
    await page.goto('about:blank');
    await page.goto(`${served.baseUrl}#line=${encodeURIComponent(id)}`);
    await page.waitForSelector('body[data-ready="true"]');
    await page.locator('#grm-figure').waitFor({ state: 'visible' });
    expect(await page.getAttribute('#grm-image', 'src')).toContain(`api/v1/surveys/${encodeURIComponent(id)}/grm.svg`);
    expect(await loadedWidth(page, '#grm-image')).toBeGreaterThan(0);
    expectNoTrouble(trouble);
    await context.close();
  });
});
