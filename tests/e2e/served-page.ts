/**
 * One service on a free loopback port (its own temporary store) and one headless Chromium,
 * started together for a browser test file and stopped together; and the few steps every
 * browser test takes on the page.
 */
import { mkdir, mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import type { Survey } from '../../engine/survey/survey.js';
import { buildApp, type AppOptions } from '../../server/app.js';
import { launchChromium, watchPage, type LaunchedBrowser, type PageTrouble } from './browser.js';
import { DEMO_GATHER_FILES } from '../../web/drop-files.js';

export interface ServedPage {
  /** The page's address, ending in '/'. */
  baseUrl: string;
  launched: LaunchedBrowser;
  close(): Promise<void>;
}

export async function servePageInChromium(options: Omit<AppOptions, 'dataDir'>): Promise<ServedPage> {
  const dataDir = await mkdtemp(join(tmpdir(), 'arcline-e2e-'));
  const app = await buildApp({ ...options, dataDir });
  const address = await app.listen({ port: 0, host: '127.0.0.1' });
  const launched = await launchChromium();
  return {
    baseUrl: address.endsWith('/') ? address : address + '/',
    launched,
    async close() {
      await launched.close();
      await app.close();
      await rm(dataDir, { recursive: true, force: true });
    },
  };
}

/** The invented sample lines shipped in samples/. */
export const SAMPLES_DIR = resolve(import.meta.dirname, '../../samples');

export async function readSample(name: string): Promise<Survey> {
  return JSON.parse(await readFile(join(SAMPLES_DIR, name), 'utf8')) as Survey;
}

/**
 * What most browser test files start from: the service with the demo line stored, one
 * Chromium, the two sample lines read, and the screenshot folder made.
 */
export async function serveDemoLine(screenshotsDir: string): Promise<{ served: ServedPage; demo: Survey; flat: Survey }> {
  await mkdir(screenshotsDir, { recursive: true });
  const [demo, flat] = await Promise.all([readSample('demo-line.json'), readSample('flat-line.json')]);
  return { served: await servePageInChromium({ seedDemo: true }), demo, flat };
}

/** Opens the page in a new empty browser context, watched for errors, once it has loaded its first line. */
export async function openArcline(launched: LaunchedBrowser, baseUrl: string): Promise<{ context: BrowserContext; page: Page; trouble: PageTrouble }> {
  const context = await launched.freshContext();
  const page = await context.newPage();
  const trouble = await watchPage(page);
  await page.goto(baseUrl);
  await page.waitForSelector('body[data-ready="true"]');
  return { context, page, trouble };
}

/** Waits until an <img> has finished loading and reports its intrinsic width (0 = failed). */
export async function loadedWidth(page: Page, selector: string): Promise<number> {
  await page.waitForFunction((sel) => {
    const img = document.querySelector<HTMLImageElement>(sel);
    return !!img && !!img.getAttribute('src') && img.complete;
  }, selector);
  return page.$eval(selector, (img) => (img as HTMLImageElement).naturalWidth);
}

/** A file as a page test hands it to the browser (bytes in base64). */
export interface DroppedFile {
  name: string;
  base64: string;
}

/** Demo A's five SEG-2 files from samples/, ready to drop. */
export async function demoGatherFiles(): Promise<DroppedFile[]> {
  return Promise.all(DEMO_GATHER_FILES.map(async (name) => ({ name, base64: (await readFile(join(SAMPLES_DIR, name))).toString('base64') })));
}

/** Drops files on the page's drop zone as a user's drag does (dragover, then drop with a DataTransfer). */
export async function dropFiles(page: Page, files: DroppedFile[]): Promise<void> {
  await page.evaluate((list) => {
    const transfer = new DataTransfer();
    for (const f of list) transfer.items.add(new File([Uint8Array.from(atob(f.base64), (c) => c.charCodeAt(0))], f.name, { type: 'application/octet-stream' }));
    const zone = document.getElementById('drop-zone')!;
    zone.dispatchEvent(new DragEvent('dragover', { dataTransfer: transfer, bubbles: true, cancelable: true }));
    zone.dispatchEvent(new DragEvent('drop', { dataTransfer: transfer, bubbles: true, cancelable: true }));
  }, files);
}
