/**
 * A long line's section on screen, in real Chromium (issue 11 item 3, "a long line's section
 * pages"): a 240-geophone, 12-shot line (closed-form first arrivals over a planar refractor,
 * tests/helpers/long-lines.ts; Kearey, Brooks & Hill 2002, ch. 5) is too long for one sheet
 * at the default paper and scale, and every sheet is reachable:
 *  - the page, stored line: a chooser "Sheet k of n" with one button per sheet; each button
 *    puts that sheet in view, and the SVG it shows says "sheet k of n" itself; printing gives
 *    every sheet;
 *  - the page, preview of the line not stored: the same chooser over the preview's sheets;
 *  - the share page (no script): every sheet on the page, captioned "sheet k of n";
 *  - issue 11's "done means": A3 at 1:2,500 chosen on the page, the PDF from its link read
 *    back with pdf.js: one A3 page (ISO 216) per sheet, the title, the scale and the depths
 *    as text, and 500 m of chainage 200 mm on paper.
 * The sheet count is the service's own (GET …/section-sheets.json), and more than one.
 */
import { readFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { serveDemoLine, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, watchPage, type LaunchedBrowser, type PageTrouble } from './browser.js';
import { longLine } from '../helpers/long-lines.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import { readPdf } from '../helpers/read-export.js';
import { metres } from '../../web/describe.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

function expectNoTrouble(trouble: PageTrouble): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(trouble.consoleErrors, trouble.badResponses.join(', ')).toEqual([]);
}

/** The section images of the page that are displayed (one on screen; every one in print). */
async function shownSheets(page: Page): Promise<{ sheet: string; src: string; width: number; bottom: number }[]> {
  return page.$$eval('#section-frame img', (images) =>
    images
      .filter((img) => getComputedStyle(img).display !== 'none' && img.getBoundingClientRect().width > 0)
      .map((img) => ({
        sheet: (img as HTMLImageElement).dataset.sheet ?? '',
        src: img.getAttribute('src') ?? '',
        width: (img as HTMLImageElement).naturalWidth,
        bottom: img.getBoundingClientRect().bottom,
      })),
  );
}

/** Waits until every section image has loaded. */
async function sheetsLoaded(page: Page, n: number): Promise<void> {
  await page.waitForFunction((count) => {
    const images = Array.from(document.querySelectorAll<HTMLImageElement>('#section-frame img'));
    return images.length === count && images.every((img) => img.complete && img.naturalWidth > 0);
  }, n);
}

describe.skipIf(!browserTestsRun)('A long line\'s section, sheet by sheet', () => {
  let launched: LaunchedBrowser;
  let served: ServedPage;
  let baseUrl: string;
  let line: Survey;
  let id: string;
  let shareUrl: string;
  let n: number;

  beforeAll(async () => {
    ({ served } = await serveDemoLine(SCREENSHOTS));
    ({ baseUrl, launched } = served);
    line = { ...longLine({ geophones: 240, spacingM: 5, shots: 12 }), name: 'Long line, 240 geophones at 5 m, 12 shots' };
    const stored = await fetch(new URL('api/v1/surveys', baseUrl), { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(line) });
    expect(stored.status).toBe(201);
    ({ id, shareUrl } = (await stored.json()) as { id: string; shareUrl: string });
    n = ((await (await fetch(new URL(`api/v1/surveys/${id}/section-sheets.json`, baseUrl))).json()) as { sheetCount: number }).sheetCount;
    // The line must run over several sheets, or the checks below could not fail.
    expect(n).toBeGreaterThan(1);
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('offers every sheet of the stored line on the page, each naming itself "sheet k of n", and prints them all', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const context = await launched.browser.newContext({ viewport: { width: 1600, height: 1000 } });
    const page = await context.newPage();
    const trouble = await watchPage(page);
    await page.goto(`${baseUrl}#line=${encodeURIComponent(id)}`);
    await page.waitForSelector('body[data-ready="true"]');
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(line.name);
    await page.locator('#sheet-chooser').waitFor({ state: 'visible' });
    expect(await page.textContent('#sheet-label')).toBe(`Sheet 1 of ${n}`);
    const labels = await page.$$eval('#sheet-buttons button', (buttons) => buttons.map((b) => b.getAttribute('aria-label')));
    expect(labels).toEqual(Array.from({ length: n }, (_, i) => `Sheet ${i + 1} of ${n}`));
    await sheetsLoaded(page, n);

    for (let k = 1; k <= n; k++) {
      await page.click(`#sheet-buttons button[data-sheet="${k}"]`);
      expect(await page.textContent('#sheet-label')).toBe(`Sheet ${k} of ${n}`);
      expect(await page.getAttribute(`#sheet-buttons button[data-sheet="${k}"]`, 'aria-pressed')).toBe('true');
      const shown = await shownSheets(page);
      expect(shown.map((s) => s.sheet), `sheet ${k}`).toEqual([String(k)]);
      expect(shown[0].width).toBeGreaterThan(0);
      // Figures first holds for every sheet.
      expect(shown[0].bottom).toBeLessThanOrEqual(1000);
      // The drawing on show is that sheet: its own title block says so.
      const svg = await page.evaluate(async (src) => (await fetch(src)).text(), shown[0].src);
      expect(svg, `sheet ${k}`).toContain(`sheet ${k} of ${n}`);
      // The SVG download is the sheet in view, and says so.
      expect(await page.textContent('#download-section')).toBe(`Depth section (SVG, sheet ${k} of ${n})`);
      expect(await page.getAttribute('#download-section', 'href')).toBe(`api/v1/surveys/${encodeURIComponent(id)}/section.svg${k === 1 ? '' : `?sheet=${k}`}`);
      if (k === 2) await page.screenshot({ path: join(SCREENSHOTS, 'long-line-sheet-2.png') });
    }

    await page.emulateMedia({ media: 'print' });
    const printed = await shownSheets(page);
    expect(printed.map((s) => s.sheet)).toEqual(Array.from({ length: n }, (_, i) => String(i + 1)));
    expect(await page.isVisible('#sheet-chooser')).toBe(false);
    expectNoTrouble(trouble);
    await context.close();
  });

  it('done means: A3 at 1:2,500 chosen on the page, the PDF downloaded from its link is one true-scale A3 page per sheet, with title and depths as text', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const context = await launched.browser.newContext({ viewport: { width: 1600, height: 1000 }, acceptDownloads: true });
    const page = await context.newPage();
    const trouble = await watchPage(page);
    await page.goto(`${baseUrl}#line=${encodeURIComponent(id)}`);
    await page.waitForSelector('body[data-ready="true"]');
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(line.name);
    await page.selectOption('#export-paper', 'A3');
    await page.fill('#export-scale', '2500');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#download-section-pdf')]);
    expect(download.suggestedFilename()).toMatch(/-section\.pdf$/);
    const pdf = await readPdf(await readFile((await download.path())!));
    const pages = pdf.pages.length;
    expect(pages).toBeGreaterThan(1);
    expect(pdf.title).toContain(line.name);
    const stations = ((await (await fetch(new URL(`api/v1/surveys/${id}`, baseUrl))).json()) as { interpretation: Interpretation }).interpretation.stations;
    pdf.pages.forEach((p, i) => {
      // ISO 216 A3 landscape, 420 × 297 mm, in points (72 per inch, 25.4 mm per inch).
      expect(p.widthPt).toBeCloseTo((420 * 72) / 25.4, 1);
      expect(p.heightPt).toBeCloseTo((297 * 72) / 25.4, 1);
      const text = p.items.map((item) => item.str).join(' ');
      expect(text).toContain(line.name);
      expect(text).toContain('1:2,500');
      expect(text).toContain(`sheet ${i + 1} of ${pages}`);
    });
    // The depth under geophone 1, as the page's table writes it, is on the first sheet.
    const first = pdf.pages[0].items.map((item) => item.str);
    expect(first.some((str) => str.replace(/[()~]/g, '') === metres(stations[0].depth))).toBe(true);
    // True scale: 500 m of chainage is 200 mm on paper at 1:2,500 (tick label centres on the axis).
    const at = (str: string, y?: number) => pdf.pages[0].items.find((item) => item.str === str && (y === undefined || Math.abs(item.y - y) < 0.5))!;
    const tick500 = at('500');
    const tick0 = at('0', tick500.y);
    const mm = ((tick500.x + tick500.width / 2 - (tick0.x + tick0.width / 2)) * 25.4) / 72;
    expect(mm).toBeCloseTo(200, 0);
    expectNoTrouble(trouble);
    await context.close();
  });

  it('offers every sheet of the preview before the line is stored', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const context = await launched.browser.newContext({ viewport: { width: 1600, height: 1000 } });
    const page = await context.newPage();
    const trouble = await watchPage(page);
    await page.goto(baseUrl);
    await page.waitForSelector('body[data-ready="true"]');
    await page.fill('#survey-text', JSON.stringify({ ...line, name: 'Long line, preview' }));
    await page.click('#interpret-button');
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
    await page.locator('#sheet-chooser').waitFor({ state: 'visible' });
    expect(await page.textContent('#sheet-label')).toBe(`Sheet 1 of ${n}`);
    await sheetsLoaded(page, n);
    for (let k = 1; k <= n; k++) {
      await page.click(`#sheet-buttons button[data-sheet="${k}"]`);
      const shown = await shownSheets(page);
      expect(shown.map((s) => s.sheet)).toEqual([String(k)]);
      expect(shown[0].src).toMatch(/^blob:/);
      expect(await page.getAttribute(`#section-frame img[data-sheet="${k}"]`, 'alt')).toBe(`Preview, not stored: depth section of Long line, preview, sheet ${k} of ${n}`);
    }
    expectNoTrouble(trouble);
    await context.close();
  });

  it('puts every sheet on the share page, each captioned and naming itself "sheet k of n"', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const context = await launched.browser.newContext({ viewport: { width: 1400, height: 900 } });
    const page = await context.newPage();
    const trouble = await watchPage(page);
    await page.goto(new URL(shareUrl, baseUrl).href);
    const sheets = page.locator('figure.section-sheet');
    expect(await sheets.count()).toBe(n);
    for (let k = 1; k <= n; k++) {
      const figure = sheets.nth(k - 1);
      expect(await figure.locator('figcaption').textContent()).toBe(`Depth section — sheet ${k} of ${n}`);
      const box = (await figure.locator('svg').boundingBox())!;
      expect(box.width).toBeGreaterThan(500);
      expect(await figure.locator('svg').textContent()).toContain(`sheet ${k} of ${n}`);
    }
    await page.click(`a[href="#section-sheet-${n}"]`);
    await page.screenshot({ path: join(SCREENSHOTS, 'long-line-share-page.png') });
    expectNoTrouble(trouble);
    await context.close();
  });
});
