/**
 * The methods compared on the page, in real Chromium (issue 13 item 3): "Compare methods"
 * draws the refractor by plus-minus, GRM and time terms on one section and lists where they
 * differ by more than their combined 1σ — for a preview (an undulating eikonal line, where the
 * methods part at the ends) and for a stored line (the demo line's planar refractor, where
 * they agree: closed-form first arrivals, every method exact).
 */
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serveDemoLine, openArcline, loadedWidth, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, type PageTrouble } from './browser.js';
import type { Survey } from '../../engine/survey/survey.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { ModelPoint } from '../../engine/forward/model.js';
import { CELL_M, LAYOUT, SEVEN_SHOTS, level } from '../reference/structure-lines.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

function expectNoTrouble(trouble: PageTrouble): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(trouble.consoleErrors, trouble.badResponses.join(', ')).toEqual([]);
}

/** ±1.5 m over 40 m at 8 m depth with 0.2 ms of seeded pick noise: the methods part (README, options.method). */
function undulatingLine(): Survey {
  const top: ModelPoint[] = [{ x: -1000, elevation: 92 }];
  for (let x = -40; x <= 140; x++) top.push({ x, elevation: 92 + 1.5 * Math.sin((2 * Math.PI * x) / 40) });
  top.push({ x: 1000, elevation: 92 });
  const line = syntheticSurvey({ surface: level(100), layers: [{ velocity: 600 }, { velocity: 2400, top }] }, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M, noiseMs: 0.2, seed: 3 });
  return { ...line, name: 'Undulating line, methods compared' };
}

describe.skipIf(!browserTestsRun)('methods compared on the page', () => {
  let served: ServedPage;
  let demo: Survey;
  beforeAll(async () => {
    ({ served, demo } = await serveDemoLine(SCREENSHOTS));
  }, BROWSER_TEST_TIMEOUT_MS);
  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('draws the comparison and its table for a preview, and for a stored line', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(served.launched, served.baseUrl);
    await page.fill('#survey-text', JSON.stringify(undulatingLine()));
    await page.click('#interpret-button');
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
    await page.click('#methods-button');
    await expect.poll(() => page.textContent('#methods-status'), POLL).not.toMatch(/runs when asked|Interpreting/);
    await page.locator('#methods-frame').waitFor({ state: 'visible', timeout: POLL.timeout });
    expect(await page.getAttribute('#methods-image', 'src')).toMatch(/^blob:/);
    expect(await loadedWidth(page, '#methods-image')).toBeGreaterThan(0);
    await expect.poll(() => page.locator('#methods-body tr').count(), POLL).toBeGreaterThan(0);
    expect(await page.textContent('#methods-status')).toMatch(/differ by more than their combined 1σ/);
    await page.locator('#methods-figure').screenshot({ path: resolve(SCREENSHOTS, 'methods-compared.png') });

    const stored = await fetch(new URL('api/v1/surveys', served.baseUrl), { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(demo) });
    expect(stored.status).toBe(201);
    const { id } = (await stored.json()) as { id: string };
    await page.goto('about:blank');
    await page.goto(`${served.baseUrl}#line=${encodeURIComponent(id)}`);
    await page.waitForSelector('body[data-ready="true"]');
    // A new line clears the comparison until asked again.
    expect(await page.locator('#methods-frame').isHidden()).toBe(true);
    await page.click('#methods-button');
    await page.locator('#methods-frame').waitFor({ state: 'visible', timeout: POLL.timeout });
    expect(await page.textContent('#methods-status')).toContain('agree within their combined 1σ');
    expect(await page.locator('#methods-table').isHidden()).toBe(true);
    expectNoTrouble(trouble);
    await context.close();
  });
});
