/**
 * The Arcline page in real Chromium against a real server (seeded with the demo line):
 * the demo section on load, a CSV line interpreted, stored and shared, errors in plain
 * words, keyboard reach, no console errors and no CSP violations.
 */
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import type { Survey } from '../../engine/survey/survey.js';
import { loadedWidth, openArcline, SAMPLES_DIR, serveDemoLine, type ServedPage } from './served-page.js';
import { BROWSER_TEST_TIMEOUT_MS, CHROMIUM_PATH, POLL, browserTestsRun, hasChromium, watchPage, type LaunchedBrowser, type PageTrouble } from './browser.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');

/**
 * How many of these URLs load as images in the page (a fresh Image each; fetch() cannot be
 * used because the page's CSP allows blob: for images only).
 */
async function imagesThatLoad(page: Page, urls: (string | null)[]): Promise<number> {
  return page.evaluate(async (list) => {
    const loads = await Promise.all(list.map((url) => new Promise<boolean>((done) => {
      const image = new Image();
      image.onload = () => done(image.naturalWidth > 0);
      image.onerror = () => done(false);
      image.src = url ?? '';
    })));
    return loads.filter(Boolean).length;
  }, urls);
}

function expectNoTrouble(trouble: PageTrouble, allowedConsole: RegExp[] = []): void {
  expect(trouble.pageErrors).toEqual([]);
  expect(trouble.cspViolations).toEqual([]);
  expect(
    trouble.consoleErrors.filter((text) => !allowedConsole.some((re) => re.test(text))),
    `responses with errors: ${trouble.badResponses.join(', ') || 'none'}`,
  ).toEqual([]);
}

// Under CI this runs even without the browser, so a missing Chromium fails the run by name.
describe.skipIf(!browserTestsRun)('Chromium for the browser tests', () => {
  it(`is installed at ${CHROMIUM_PATH}`, () => {
    expect(hasChromium, "install Debian's chromium (apt-get install chromium)").toBe(true);
  });
});

describe.skipIf(!browserTestsRun)('Arcline page in Chromium', () => {
  let launched: LaunchedBrowser;
  let served: ServedPage;
  let baseUrl: string;
  let demo: Survey;
  let flat: Survey;

  beforeAll(async () => {
    ({ served, demo, flat } = await serveDemoLine(SCREENSHOTS));
    ({ baseUrl, launched } = served);
  }, BROWSER_TEST_TIMEOUT_MS);

  afterAll(async () => {
    await served?.close();
  }, BROWSER_TEST_TIMEOUT_MS);

  it('opens the stored demo line on load with its depth section and time–distance plot drawn', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);

    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(demo.name);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    expect(await page.getAttribute('#section-image', 'alt')).toContain(demo.name ?? '');

    // One table row per geophone of the demo line.
    expect(await page.locator('#station-body tr').count()).toBe(demo.geophones.length);

    // Nothing inline that a strict Content-Security-Policy would block.
    const inline = await page.evaluate(() => {
      const found: string[] = [];
      for (const node of Array.from(document.querySelectorAll('*'))) {
        if (node.hasAttribute('style')) found.push(`${node.tagName} style=`);
        for (const name of node.getAttributeNames()) if (name.startsWith('on')) found.push(`${node.tagName} ${name}=`);
      }
      for (const script of Array.from(document.querySelectorAll('script'))) if (!script.src) found.push('inline <script>');
      if (document.querySelector('style')) found.push('<style> element');
      return found;
    });
    expect(inline).toEqual([]);

    // The cautions on the page are the engine's own sentences, word for word.
    const shown = await page.locator('.cautions .caution').allTextContents();
    expect(shown.map((t) => t.replace(/\s+/g, ' ').trim())).toEqual([...CAUTIONS]);

    // Downloads point at the stored line's files, and the files answer.
    const downloads = ['download-section', 'download-traveltimes', 'download-stations', 'download-interpretation'];
    downloads.push('download-section-pdf', 'download-section-png', 'download-traveltimes-pdf', 'download-traveltimes-png');
    for (const id of downloads) {
      const href = await page.getAttribute('#' + id, 'href');
      expect(href).toMatch(/^api\/v1\/surveys\/[^/]+\/(section\.(svg|pdf|png)|traveltimes\.(svg|pdf|png)|stations\.csv|interpretation\.json)$/);
      const response = await page.request.get(new URL(href!, baseUrl).href);
      expect(response.status(), href!).toBe(200);
    }

    // Paper and scale chosen beside the links go into the PDF's query, and the file answers.
    await page.selectOption('#export-paper', 'A3');
    await page.fill('#export-scale', '250');
    const pdfHref = await page.getAttribute('#download-section-pdf', 'href');
    expect(pdfHref).toMatch(/section\.pdf\?paper=A3&scale=250$/);
    const pdf = await page.request.get(new URL(pdfHref!, baseUrl).href);
    expect(pdf.status(), pdfHref!).toBe(200);
    expect(pdf.headers()['content-type']).toContain('application/pdf');

    await page.screenshot({ path: join(SCREENSHOTS, 'demo-line.png'), fullPage: true });
    expectNoTrouble(trouble);
    await context.close();
  });

  it('interprets flat-line.csv from the file input, stores it, and the share link shows the same line in a fresh context', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);

    await page.setInputFiles('#file-input', join(SAMPLES_DIR, 'flat-line.csv'));
    await expect.poll(() => page.textContent('#format-name'), POLL).toContain('CSV');

    // Keeps every Blob the page turns into a URL, to compare the images with the answer (the
    // page's CSP forbids reading blob: URLs back, rightly).
    await page.evaluate(() => {
      const made = new Map<string, Blob>();
      (window as unknown as { __blobsMade: Map<string, Blob> }).__blobsMade = made;
      const original = URL.createObjectURL.bind(URL);
      URL.createObjectURL = (object: Blob | MediaSource) => {
        const url = original(object);
        if (object instanceof Blob) made.set(url, object);
        return url;
      };
    });
    // Every request the page sends to the API from the click on: one click, one request.
    const apiRequests: string[] = [];
    page.on('request', (r) => {
      if (new URL(r.url()).pathname.startsWith('/api/')) apiRequests.push(`${r.method()} ${new URL(r.url()).pathname}`);
    });
    const interpreted = page.waitForResponse((r) => r.url().endsWith('/api/v1/previews') && r.request().method() === 'POST');
    await page.click('#interpret-button');
    const response = await interpreted;
    expect(response.status()).toBe(200);
    const bundle = (await response.json()) as { interpretation: { stations: { x: number }[] }; sectionSvg: string; travelTimesSvg: string };
    const { interpretation } = bundle;
    expect(bundle.sectionSvg).toContain('<svg');
    expect(bundle.travelTimesSvg).toContain('<svg');

    // One row per geophone, in order, with the geophone's x in the first column.
    const rows = page.locator('#station-body tr');
    await expect.poll(() => rows.count(), POLL).toBe(flat.geophones.length);
    expect(interpretation.stations.length).toBe(flat.geophones.length);
    const firstColumn = await page.locator('#station-body tr > th').allTextContents();
    expect(firstColumn.map(Number)).toEqual(flat.geophones.map((g) => g.x));
    expect(await page.isVisible('#unsaved-note')).toBe(true);

    // Before storing, both figures are drawn from the previews, shown from blob: URLs and marked.
    await page.waitForSelector('#figures:not([hidden])');
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    const previewSrcs = [await page.getAttribute('#section-image', 'src'), await page.getAttribute('#traveltimes-image', 'src')];
    for (const src of previewSrcs) expect(src).toMatch(/^blob:/);
    expect(previewSrcs[0]).not.toBe(previewSrcs[1]);
    // The images show exactly the SVG text of that one answer.
    const shownSvgs = await page.evaluate(async (urls) => Promise.all(urls.map(async (url) => {
      const blob = (window as unknown as { __blobsMade: Map<string, Blob> }).__blobsMade.get(url ?? '');
      return blob ? { type: blob.type, text: await blob.text() } : null;
    })), previewSrcs);
    expect(shownSvgs).toEqual([
      { type: 'image/svg+xml', text: bundle.sectionSvg },
      { type: 'image/svg+xml', text: bundle.travelTimesSvg },
    ]);
    // Table, summary and both figures came from one request: nothing else reached the API.
    expect(apiRequests).toEqual(['POST /api/v1/previews']);
    expect(await page.isVisible('#preview-note')).toBe(true);
    expect(await page.textContent('#preview-note')).toContain('Not stored — preview');
    const captionTags = page.locator('#figures figure:not([hidden]) figcaption .preview-tag');
    expect(await captionTags.count()).toBe(2);
    for (const tag of await captionTags.all()) {
      expect(await tag.isVisible()).toBe(true);
      expect(await tag.textContent()).toBe('Not stored — preview');
    }
    expect(await page.getAttribute('#section-image', 'alt')).toContain(flat.name ?? '');
    expect(await page.getAttribute('#section-image', 'alt')).toMatch(/not stored/i);
    // Control for the revocation check after Store: while shown, the preview URLs load.
    expect(await imagesThatLoad(page, previewSrcs)).toBe(2);
    // Nothing was stored by interpreting and previewing: the stored list still holds only the two seeded demo lines.
    expect(await page.locator('#stored-list button[data-line-id]').count()).toBe(2);
    await page.screenshot({ path: join(SCREENSHOTS, 'flat-line-interpreted.png'), fullPage: true });

    const stored = page.waitForResponse((r) => r.url().endsWith('/api/v1/surveys') && r.request().method() === 'POST');
    await page.click('#store-button');
    const storeResponse = await stored;
    expect(storeResponse.status()).toBe(201);
    const storeBody = (await storeResponse.json()) as { id: string; shareUrl: string };

    await page.waitForSelector('#share-panel:not([hidden])');
    const shareLink = await page.inputValue('#share-url');
    expect(shareLink).toBe(new URL(storeBody.shareUrl, baseUrl).href);
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe(flat.name);
    expect(await loadedWidth(page, '#section-image')).toBeGreaterThan(0);
    expect(await loadedWidth(page, '#traveltimes-image')).toBeGreaterThan(0);
    // The stored figures replace the previews: served by the store, no preview marks.
    expect(await page.getAttribute('#section-image', 'src')).toBe(`api/v1/surveys/${encodeURIComponent(storeBody.id)}/section.svg`);
    expect(await page.getAttribute('#traveltimes-image', 'src')).toBe(`api/v1/surveys/${encodeURIComponent(storeBody.id)}/traveltimes.svg`);
    expect(await page.isVisible('#preview-note')).toBe(false);
    expect(await page.locator('#figures figcaption .preview-tag:visible').count()).toBe(0);
    // The replaced preview blobs were revoked: their URLs no longer load.
    expect(await imagesThatLoad(page, previewSrcs)).toBe(0);
    // The new line is in the stored list and marked as the open one.
    const current = page.locator('#stored-list button[aria-current="true"]');
    expect(await current.getAttribute('data-line-id')).toBe(String(storeBody.id));
    expect(await current.locator('.stored-name').textContent()).toBe(flat.name);
    await page.screenshot({ path: join(SCREENSHOTS, 'flat-line-stored.png'), fullPage: true });

    // "Copy link" puts the link on the clipboard and says so.
    await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: new URL(baseUrl).origin });
    await page.click('#copy-button');
    await expect.poll(() => page.textContent('#status'), POLL).toBe('Share link copied.');
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(shareLink);
    // Chromium logs each refused load of a revoked blob: URL; exactly the two probed above are allowed.
    expect(trouble.consoleErrors.filter((text) => /ERR_FILE_NOT_FOUND/.test(text))).toHaveLength(previewSrcs.length);
    expectNoTrouble(trouble, [/ERR_FILE_NOT_FOUND/]);

    // A colleague opens the link with nothing in their browser: same line, a drawn section.
    const colleague = await launched.freshContext();
    const sharePage = await colleague.newPage();
    const shareTrouble = await watchPage(sharePage);
    const shareResponse = await sharePage.goto(shareLink);
    expect(shareResponse?.status()).toBe(200);
    expect(await sharePage.textContent('body')).toContain(flat.name);
    await sharePage.waitForLoadState('load');
    const drawnSvgs = await sharePage.evaluate(() => {
      const inline = document.querySelectorAll('svg').length;
      const images = Array.from(document.querySelectorAll('img'))
        .filter((img) => /\.svg(\?|$)/.test(img.getAttribute('src') ?? '') && img.naturalWidth > 0).length;
      const objects = document.querySelectorAll('object[type="image/svg+xml"]').length;
      return inline + images + objects;
    });
    expect(drawnSvgs).toBeGreaterThan(0);
    // The share page's station table and the page's show the same columns, units and digits
    // (both from web/station-columns.js).
    const pageTable = await page.evaluate(() => ({
      head: Array.from(document.querySelectorAll('#station-head th')).map((th) => {
        const unit = th.querySelector('.col-unit')?.textContent;
        return th.querySelector('.col-name')?.textContent + (unit ? ` (${unit})` : '');
      }),
      rows: Array.from(document.querySelectorAll('#station-body tr')).map((tr) => Array.from(tr.children).map((cell) => cell.textContent)),
    }));
    const shareTable = await sharePage.evaluate(() => ({
      head: Array.from(document.querySelectorAll('table thead th')).map((th) => th.textContent),
      rows: Array.from(document.querySelectorAll('table tbody tr')).map((tr) => Array.from(tr.children).map((cell) => cell.textContent)),
    }));
    expect(pageTable.rows).toHaveLength(flat.geophones.length);
    expect(shareTable).toEqual(pageTable);
    await sharePage.screenshot({ path: join(SCREENSHOTS, 'share-page.png'), fullPage: true });
    expectNoTrouble(shareTrouble);
    await colleague.close();
    await context.close();
  });

  it('replaces the open line with the error of a rejected survey, and lists every problem once, in plain words with where it is', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    // The stored demo line is on show first: its figures and table must not stay beside the error.
    await page.locator('#station-body tr').first().waitFor();
    expect(await page.isVisible('#figures')).toBe(true);

    // Two faults: geophones out of order, and a negative first-break time.
    const bad = structuredClone(flat);
    bad.geophones[3].x = bad.geophones[1].x;
    bad.shots[1].times[5] = -4;
    await page.fill('#survey-text', JSON.stringify(bad, null, 2));
    await expect.poll(() => page.textContent('#format-name'), POLL).toContain('JSON');

    const answered = page.waitForResponse((r) => r.url().endsWith('/api/v1/previews'));
    await page.click('#interpret-button');
    const response = await answered;
    expect(response.status()).toBe(400);
    const body = (await response.json()) as {
      error: { message: string; path: string };
      problems?: { path: string; message: string }[];
    };

    const box = page.locator('#error-box');
    await box.waitFor({ state: 'visible' });
    expect(await box.getAttribute('role')).toBe('alert');
    const text = (await box.textContent()) ?? '';
    const problems = body.problems?.length ? body.problems : [{ path: body.error.path, message: body.error.message }];
    expect(problems.length).toBe(2);
    expect(await box.locator('.problem-list > li').count()).toBe(problems.length);
    expect(text).toContain('The line was not interpreted: 2 problems, each listed below.');
    for (const problem of problems) {
      // Each problem once: the service's summary sentence repeats the first, and is not shown.
      expect(text.split(problem.message).length - 1, problem.message).toBe(1);
    }
    expect(text).not.toMatch(/listed in .?problems/i);
    // Where, in words (no JSON pointer where words exist).
    expect(text).toContain('Where: geophone 4, field “x”');
    expect(text).toContain(`Where: shot 2 (“${bad.shots[1].id}”), pick at geophone 6`);
    expect(text).not.toContain('/shots/1/times/5');

    // The error replaced the demo line: no figures, no table, no summary of the old line; the
    // header says so and points to the problems beside the input.
    await expect.poll(() => page.textContent('#line-title'), POLL).toBe('Not interpreted');
    expect(await page.textContent('#line-badge')).toBe('Not interpreted');
    for (const gone of ['#figures', '#stations', '#summary', '#files-panel', '#line-notes', '#allowance']) {
      expect(await page.isVisible(gone), gone).toBe(false);
    }
    expect(await page.locator('#station-body tr').count()).toBe(0);
    expect(await page.isVisible('#failed-note')).toBe(true);
    expect(await page.textContent('#failed-note')).toContain('listed beside the input');
    expect(await page.locator('#stored-list [aria-current="true"]').count()).toBe(0);
    // Beside the input: the error box sits in the load panel, right of nothing but the input.
    const panel = await page.locator('#load-heading').locator('..').boundingBox();
    const boxRect = await box.boundingBox();
    expect(boxRect!.x).toBeGreaterThanOrEqual(panel!.x);
    expect(boxRect!.x + boxRect!.width).toBeLessThanOrEqual(panel!.x + panel!.width + 1);
    await page.screenshot({ path: join(SCREENSHOTS, 'rejected-survey.png'), fullPage: true });
    // Chromium logs every non-2xx fetch as a console error; the 400 here is the point of the test.
    expectNoTrouble(trouble, [/status of 400/]);
    await context.close();
  });

  it('is usable from the keyboard: Tab reaches the file input and the buttons in order, with a visible focus ring', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);

    const reached: string[] = [];
    for (let i = 0; i < 12; i += 1) {
      await page.keyboard.press('Tab');
      reached.push(await page.evaluate(() => document.activeElement?.id || document.activeElement?.tagName || ''));
    }
    const fileAt = reached.indexOf('file-input');
    const textAt = reached.indexOf('survey-text');
    const interpretAt = reached.indexOf('interpret-button');
    const storeAt = reached.indexOf('store-button');
    expect(fileAt, reached.join(' → ')).toBeGreaterThanOrEqual(0);
    expect(textAt).toBeGreaterThan(fileAt);
    expect(interpretAt).toBeGreaterThan(textAt);
    expect(storeAt).toBeGreaterThan(interpretAt);

    // Paste a survey, Tab to Interpret, press Enter: the table appears.
    await page.focus('#survey-text');
    await page.fill('#survey-text', JSON.stringify(flat));
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('interpret-button');
    const outline = await page.$eval('#interpret-button', (b) => {
      const style = getComputedStyle(b);
      return { style: style.outlineStyle, width: parseFloat(style.outlineWidth) };
    });
    expect(outline.style).not.toBe('none');
    expect(outline.width).toBeGreaterThanOrEqual(2);
    await page.screenshot({ path: join(SCREENSHOTS, 'keyboard-focus.png') });
    const interpreted = page.waitForResponse((r) => r.url().endsWith('/api/v1/previews'));
    await page.keyboard.press('Enter');
    expect((await interpreted).status()).toBe(200);
    // The page now shows the unsaved interpretation (not the stored line it opened on load).
    await expect.poll(() => page.textContent('#line-badge'), POLL).toBe('Not stored');
    expect(await page.locator('#station-body tr').count()).toBe(flat.geophones.length);
    expect(await page.textContent('#line-title')).toBe(flat.name);
    expectNoTrouble(trouble);
    await context.close();
  });

  it('names a binary file and an empty file for what they are, and keeps garbage out of the text box', { timeout: BROWSER_TEST_TIMEOUT_MS }, async () => {
    const { context, page, trouble } = await openArcline(launched, baseUrl);
    await page.fill('#survey-text', '# name: kept\n');
    // A SEG-2 shot record starts with the block id 0x3A55, little-endian (from memory: Pullan 1990); the rest is invented.
    const record = Buffer.alloc(512);
    record.writeUInt16LE(0x3a55, 0);
    record.writeUInt16LE(1, 2);
    for (let i = 32; i < 512; i += 1) record[i] = (i * 37) % 256;
    await page.setInputFiles('#file-input', { name: 'shot-01.sg2', mimeType: 'application/octet-stream', buffer: record });
    const box = page.locator('#error-box');
    await box.waitFor({ state: 'visible' });
    const text = (await box.textContent()) ?? '';
    expect(text).toContain('“shot-01.sg2” is a SEG-2 seismograph record, not a pick file');
    expect(text).toContain('CSV pick table');
    expect(text).toContain('under “Seismograph files” above');
    expect(await page.inputValue('#survey-text')).toBe('# name: kept\n');
    expect(await page.inputValue('#file-input')).toBe('');

    // An empty file that was chosen is named; the page does not ask to choose one.
    await page.setInputFiles('#file-input', { name: 'picks.csv', mimeType: 'text/csv', buffer: Buffer.alloc(0) });
    await expect.poll(() => page.textContent('#format-name'), POLL).toBe('nothing loaded yet');
    await page.click('#interpret-button');
    await expect.poll(() => box.textContent(), POLL).toContain('The file “picks.csv” is empty');
    expect(await box.textContent()).not.toContain('choose a pick file');
    expectNoTrouble(trouble);
    await context.close();
  });
});
