/**
 * Printing and the first screen, in real Chromium (store seeded with the demo line):
 *  - print emulation (page.emulateMedia({ media: 'print' })) of the page and of the share page
 *    shows both figures and every station row, none cut by a scrolling box, and not the sidebar;
 *  - at 1600×1000 the depth section and the time–distance plot are both wholly in view (side
 *    by side) under the line's title, before the warnings, downloads and table, with the
 *    cautions and the hidden-layer allowance above them in a few lines; Enlarge gives the
 *    section the whole width. Screenshots at 1600×1000 and 1280×800 go to test-output/e2e.
 */
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import type { Survey } from '../../engine/survey/survey.js';
import { CAUTIONS } from '../../engine/index.js';
import { loadedWidth, serveDemoLine, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, POLL, browserTestsRun, watchPage, type LaunchedBrowser, type PageTrouble } from './browser.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

function expectNoTrouble(trouble: PageTrouble): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(trouble.consoleErrors, trouble.badResponses.join(', ')).toEqual([]);
}

async function openAt(launched: LaunchedBrowser, url: string, width: number, height: number): Promise<{ page: Page; trouble: PageTrouble; close: () => Promise<void> }> {
  const context = await launched.browser.newContext({ viewport: { width, height } });
  const page = await context.newPage();
  const trouble = await watchPage(page);
  await page.goto(url);
  return { page, trouble, close: () => context.close() };
}

/** Whether the box scrolls its content (so part of it is cut from a print). */
async function clipsContent(box: Locator): Promise<boolean> {
  return box.evaluate((el) => el.scrollHeight > el.clientHeight + 1 || el.scrollWidth > el.clientWidth + 1);
}

/** Every row of the table has a box of its own inside every scrolling ancestor's visible area. */
async function rowsShown(page: Page, rowSelector: string): Promise<{ rows: number; shown: number }> {
  return page.evaluate((selector) => {
    const rows = Array.from(document.querySelectorAll(selector));
    let shown = 0;
    for (const row of rows) {
      const rect = row.getBoundingClientRect();
      if (rect.height <= 0 || rect.width <= 0) continue;
      let inside = true;
      for (let el = row.parentElement; el; el = el.parentElement) {
        const style = getComputedStyle(el);
        if (style.display === 'none' || style.visibility === 'hidden') inside = false;
        if (/(auto|scroll|hidden)/.test(style.overflowY)) {
          const box = el.getBoundingClientRect();
          if (rect.top < box.top - 1 || rect.bottom > box.bottom + 1) inside = false;
        }
      }
      if (inside) shown += 1;
    }
    return { rows: rows.length, shown };
  }, rowSelector);
}

describe.skipIf(!browserTestsRun)('Printing and the first screen', () => {
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

  it('prints the page with both figures and every station row, without the sidebar', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { page, trouble, close } = await openAt(launched, baseUrl, 1400, 900);
    await page.waitForSelector('body[data-ready="true"]');
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    const rows = page.locator('#station-body tr');
    expect(await rows.count()).toBe(demo.geophones.length);
    // On screen the table scrolls inside its box (the demo line's 24 rows are taller than it),
    // so the print check below could fail.
    expect(await clipsContent(page.locator('#stations .table-wrap'))).toBe(true);
    expect((await rowsShown(page, '#station-body tr')).shown).toBeLessThan(demo.geophones.length);

    await page.emulateMedia({ media: 'print' });
    expect(await page.isVisible('.sidebar')).toBe(false);
    expect(await page.isVisible('.masthead')).toBe(false);
    for (const image of ['#section-image', '#traveltimes-image']) {
      expect(await page.isVisible(image), image).toBe(true);
      const box = (await page.locator(image).boundingBox())!;
      expect(box.width, image).toBeGreaterThan(500);
      expect(box.height, image).toBeGreaterThan(300);
    }
    expect(await clipsContent(page.locator('#stations .table-wrap'))).toBe(false);
    expect(await rowsShown(page, '#station-body tr')).toEqual({ rows: demo.geophones.length, shown: demo.geophones.length });
    // The cautions print with the figures.
    const cautions = await page.locator('#cautions .caution').allTextContents();
    expect(cautions.map((c) => c.trim())).toEqual([...CAUTIONS]);
    expect(await page.isVisible('#cautions')).toBe(true);
    await page.screenshot({ path: join(SCREENSHOTS, 'print-page.png'), fullPage: true });
    const pdf = await page.pdf({ format: 'A4', landscape: true });
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expectNoTrouble(trouble);
    await close();
  });

  it('prints the share page with both figures and every station row', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const listed = (await (await fetch(new URL('api/v1/surveys', baseUrl))).json()) as { id: string }[];
    const detail = (await (await fetch(new URL(`api/v1/surveys/${listed[0].id}`, baseUrl))).json()) as { shareUrl: string };
    const { page, trouble, close } = await openAt(launched, new URL(detail.shareUrl, baseUrl).href, 1400, 900);
    await page.emulateMedia({ media: 'print' });
    const figures = page.locator('figure > svg');
    expect(await figures.count()).toBe(2);
    for (let i = 0; i < 2; i += 1) {
      const box = (await figures.nth(i).boundingBox())!;
      expect(box.width).toBeGreaterThan(500);
      expect(box.height).toBeGreaterThan(300);
    }
    expect(await clipsContent(page.locator('.table-wrap'))).toBe(false);
    expect(await rowsShown(page, 'tbody tr')).toEqual({ rows: demo.geophones.length, shown: demo.geophones.length });
    expect(await page.isVisible('a[download]')).toBe(false);
    await page.screenshot({ path: join(SCREENSHOTS, 'print-share-page.png'), fullPage: true });
    expectNoTrouble(trouble);
    await close();
  });

  it('shows the depth section and the time–distance plot both wholly above the fold on a 1600×1000 screen, the cautions above them in a few lines', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { page, trouble, close } = await openAt(launched, baseUrl, 1600, 1000);
    await page.waitForSelector('body[data-ready="true"]');
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    const section = (await page.locator('#section-image').boundingBox())!;
    const plot = (await page.locator('#traveltimes-image').boundingBox())!;
    // Issue 11 item 12, figures first: both figures wholly in view without scrolling, side by side.
    for (const [name, box] of [['section', section], ['plot', plot]] as const) {
      expect(box.y, name).toBeGreaterThan(0);
      expect(box.y + box.height, name).toBeLessThanOrEqual(1000);
      expect(box.x + box.width, name).toBeLessThanOrEqual(1600);
    }
    expect(plot.x).toBeGreaterThanOrEqual(section.x + section.width);
    for (const figure of ['#section-figure', '#traveltimes-figure']) {
      const box = (await page.locator(figure).boundingBox())!;
      expect(box.y + box.height, figure).toBeLessThanOrEqual(1000);
    }
    // Each at a size a reader can take in at a glance: at least half its 277 mm drawing width at
    // 96 px per inch (1047 px), so about 1:2 of the printed sheet.
    const drawnWidth = (selector: string) => page.locator(selector).evaluate((img) => {
      const i = img as HTMLImageElement;
      return i.naturalWidth * Math.min(i.clientWidth / i.naturalWidth, i.clientHeight / i.naturalHeight);
    });
    expect(await drawnWidth('#section-image')).toBeGreaterThan(0.5 * 1047);
    expect(await drawnWidth('#traveltimes-image')).toBeGreaterThan(0.5 * 1047);
    // The plot follows straight after, before anything else of the line.
    const after = ['#allowance', '#warnings', '#files-panel', '#summary', '#stations'];
    for (const selector of after) {
      const box = await page.locator(selector).boundingBox();
      if (box) expect(box.y, selector).toBeGreaterThan(plot.y);
    }
    // The cautions stay in view above the figures, in at most a few lines.
    const cautions = (await page.locator('#cautions').boundingBox())!;
    expect(cautions.y + cautions.height).toBeLessThanOrEqual(Math.min(section.y, plot.y));
    expect(cautions.height).toBeLessThan(110);
    expect(await page.locator('#cautions .caution').allTextContents()).toHaveLength(2);
    // The hidden-layer allowance: one calm line with its number above the figures, not a warning.
    const notes = (await page.textContent('#line-notes')) ?? '';
    expect(notes).toMatch(/^Hidden-layer allowance: the refractor could be up to \d+\.\d m deeper than drawn if a thin layer hides above it\./);
    expect(await page.isVisible('#warnings')).toBe(false);
    expect(await page.textContent('#allowance')).toContain('Depth if a hidden layer');
    await page.screenshot({ path: join(SCREENSHOTS, 'first-screen-1600x1000.png') });
    // Enlarge gives the section the whole width, near its printed size, still wholly in view.
    await page.click('button[data-enlarge="section-figure"]');
    expect(await page.getAttribute('button[data-enlarge="section-figure"]', 'aria-pressed')).toBe('true');
    const enlarged = (await page.locator('#section-image').boundingBox())!;
    expect(await drawnWidth('#section-image')).toBeGreaterThan(0.8 * 1047);
    expect(enlarged.y + enlarged.height).toBeLessThanOrEqual(1000);
    await page.screenshot({ path: join(SCREENSHOTS, 'first-screen-1600x1000-enlarged.png') });
    await page.click('button[data-enlarge="section-figure"]');
    expect(await page.textContent('button[data-enlarge="section-figure"]')).toBe('Enlarge');
    await page.setViewportSize({ width: 1280, height: 800 });
    await page.screenshot({ path: join(SCREENSHOTS, 'first-screen-1280x800.png') });
    expectNoTrouble(trouble);
    await close();
  });
});
