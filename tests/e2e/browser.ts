/**
 * Launches Debian's Chromium for the browser tests. Never downloads a browser build:
 * playwright-core only drives the executable already on the machine.
 *
 * Outside CI a missing Chromium skips the browser tests with a one-line hint; under CI
 * (CI=true) the tests run anyway and fail at launch, so a missing browser cannot pass
 * unnoticed.
 */
import { existsSync } from 'node:fs';
import { chromium, type Browser, type BrowserContext, type ConsoleMessage, type Page } from 'playwright-core';

export const CHROMIUM_PATH = '/usr/bin/chromium';
export const hasChromium = existsSync(CHROMIUM_PATH);
export const isCI = process.env.CI === 'true';

/**
 * Time allowed for one browser test, ms. Generous because CI runs every test file at once
 * on two cores; a slow run is not a failure (no speed is asserted anywhere).
 */
export const BROWSER_TEST_TIMEOUT_MS = 180_000;

/** Options for expect.poll: wait up to 30 s for the page to settle (vitest's default is 1 s). */
export const POLL = { timeout: 30_000, interval: 100 } as const;

/** Whether the browser tests should run here: always under CI, else only with Chromium present. */
export const browserTestsRun = hasChromium || isCI;

if (!browserTestsRun) {
  console.warn("browser tests skipped: install Debian's chromium (apt-get install chromium)");
}

export interface LaunchedBrowser {
  browser: Browser;
  /** A new context with an empty profile (no cookies, storage or cache from earlier contexts). */
  freshContext(): Promise<BrowserContext>;
  close(): Promise<void>;
}

/** Starts headless Chromium (never a downloaded build). */
export async function launchChromium(): Promise<LaunchedBrowser> {
  if (!hasChromium) {
    throw new Error(
      `Chromium not found at ${CHROMIUM_PATH}: the browser tests need Debian's chromium (apt-get install chromium).`,
    );
  }
  // launch() gives Chromium a new temporary profile directory each time, and every
  // newContext() starts empty (no cookies, storage or cache): a fresh profile per test.
  const browser = await chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'],
  });
  return {
    browser,
    freshContext: () => browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true }),
    async close() {
      await browser.close();
    },
  };
}

/** What went wrong on a page while a test used it: console errors, uncaught errors, CSP reports. */
export interface PageTrouble {
  consoleErrors: string[];
  pageErrors: string[];
  cspViolations: string[];
  /** Responses with status 400 or more, as "status URL": names the resource behind a console error. */
  badResponses: string[];
}

/**
 * Starts recording a page's console errors, uncaught exceptions and CSP violations.
 * CSP violations show up as console errors ("Refused to …") and as securitypolicyviolation
 * events, which are forwarded through an exposed function.
 */
export async function watchPage(page: Page): Promise<PageTrouble> {
  const trouble: PageTrouble = { consoleErrors: [], pageErrors: [], cspViolations: [], badResponses: [] };
  page.on('response', (response) => {
    if (response.status() >= 400) trouble.badResponses.push(`${response.status()} ${response.url()}`);
  });
  page.on('console', (message: ConsoleMessage) => {
    if (message.type() !== 'error') return;
    const text = message.text();
    trouble.consoleErrors.push(text);
    if (/Content Security Policy|Refused to/i.test(text)) trouble.cspViolations.push(text);
  });
  page.on('pageerror', (error) => trouble.pageErrors.push(String(error)));
  await page.exposeFunction('__arclineReportCsp', (text: string) => trouble.cspViolations.push(text));
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (event) => {
      const report = (window as unknown as { __arclineReportCsp?: (t: string) => void }).__arclineReportCsp;
      report?.(`${event.violatedDirective} blocked ${event.blockedURI}`);
    });
  });
  return trouble;
}
