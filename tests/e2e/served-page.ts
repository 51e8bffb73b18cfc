/**
 * One service on a free loopback port (its own temporary store) and one headless Chromium,
 * started together for a browser test file and stopped together.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildApp, type AppOptions } from '../../server/app.js';
import { launchChromium, type LaunchedBrowser } from './browser.js';

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
