/**
 * The time–distance plots of a 10-shot and a 40-shot line laid out by Chromium (issue 11,
 * item 4): no two text labels' boxes overlap as the browser sets the glyphs
 * (getBoundingClientRect, rotation included), and each plot is written to PNG under
 * test-output/e2e for a person to look at.
 */
import { mkdir } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { renderTravelTimes } from '../../engine/render/travel-times.js';
import { fortyShotLine, tenShotLine } from '../helpers/many-shot-lines.js';
import { BROWSER_TEST_TIMEOUT_MS, browserTestsRun, launchChromium, type LaunchedBrowser } from './browser.js';

const SCREENSHOTS = resolve(import.meta.dirname, '../../test-output/e2e');
/** Labels in and around the plot; tick labels sit in the axis groups. */
const SELECTOR = ['branch-label', 'reciprocal-label', 'label-note', 'x-title', 'y-title']
  .map((r) => `text[data-role="${r}"]`)
  .concat(['[data-role="x-axis"] > text', '[data-role="y-axis"] > text'])
  .join(', ');
/** Overlap allowed between two laid-out boxes, px each way: none (boxes may touch). */
const SLACK_PX = 0;

describe.skipIf(!browserTestsRun)('time–distance plots of many shots in Chromium', () => {
  let chromium: LaunchedBrowser;
  beforeAll(async () => {
    chromium = await launchChromium();
    await mkdir(SCREENSHOTS, { recursive: true });
  }, BROWSER_TEST_TIMEOUT_MS);
  afterAll(async () => {
    await chromium?.close();
  });

  for (const [name, make] of [['10-shot', tenShotLine], ['40-shot', fortyShotLine]] as const) {
    it(
      `${name} line: no two labels overlap as laid out, and the PNG is written`,
      async () => {
        const survey = make();
        const svg = renderTravelTimes(survey, interpret(survey));
        const context = await chromium.freshContext();
        const page = await context.newPage();
        // 277 × 190 mm drawn at 6 px/mm.
        await page.setViewportSize({ width: 1662, height: 1140 });
        await page.setContent(`<!doctype html><body style="margin:0">${svg.replace(/<\?xml[^>]*>/, '')}</body>`);
        await page.evaluate(() => {
          const el = document.querySelector('svg')!;
          el.setAttribute('width', '1662');
          el.setAttribute('height', '1140');
        });
        const boxes = await page.evaluate((selector) => {
          return Array.from(document.querySelectorAll(selector)).map((t) => {
            const r = t.getBoundingClientRect();
            return { text: t.textContent ?? '', x0: r.left, y0: r.top, x1: r.right, y1: r.bottom };
          });
        }, SELECTOR);
        expect(boxes.filter((b) => b.text.includes('m/s')).length).toBeGreaterThan(10);
        expect(boxes.filter((b) => b.text.startsWith('Δ')).length).toBeGreaterThan(10);
        const overlaps: string[] = [];
        for (let i = 0; i < boxes.length; i++) {
          for (let j = i + 1; j < boxes.length; j++) {
            const w = Math.min(boxes[i].x1, boxes[j].x1) - Math.max(boxes[i].x0, boxes[j].x0);
            const h = Math.min(boxes[i].y1, boxes[j].y1) - Math.max(boxes[i].y0, boxes[j].y0);
            if (w > SLACK_PX && h > SLACK_PX) overlaps.push(`"${boxes[i].text}" / "${boxes[j].text}" (${w.toFixed(1)} × ${h.toFixed(1)} px)`);
          }
        }
        await page.screenshot({ path: join(SCREENSHOTS, `traveltimes-${name}.png`) });
        await context.close();
        expect(overlaps).toEqual([]);
      },
      BROWSER_TEST_TIMEOUT_MS,
    );
  }
});
