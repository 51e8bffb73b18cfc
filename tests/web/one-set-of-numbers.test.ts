// One set of numbers: the drawings, the page, the share page and stations.csv show the same
// values with the same decimals, because all of them format through engine/output/display-precision.js
// (0.1 m, 0.1 ms, 0.1°, velocities to 10 m/s: the precision a refraction velocity is quoted
// to, common practice). Checked on the rendered SVGs and pages, not on the helpers alone.
import { readdirSync, readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import { renderSection, renderTravelTimes } from '../../engine/render/index.js';
import { formatMetres, formatMs, formatVelocity } from '../../engine/render/format.js';
import { CAUTIONS } from '../../engine/index.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { metres, milliseconds, refractorDepthRanges, velocity } from '../../web/describe.js';
import { DISPLAY_PRECISION } from '../../engine/output/display-precision.js';
import { cellData, cellText, stationColumns } from '../../web/station-columns.js';
import { hiddenLayerNote, otherWarnings } from '../../web/hidden-layer-note.js';
import { readableSurveyDate, readableTime, renderSharePage } from '../../server/share-page.js';
import { stationsCsv } from '../../server/stations-csv.js';

let survey: Survey;
let demo: Interpretation;
let sectionSvg: string;
let travelTimesSvg: string;

/** Text nodes of an SVG (svg.js writes labels as <text> with optional <tspan>s). */
function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([\s\S]*?)<\/text>/g)].map((m) => m[1].replace(/<[^>]+>/g, '').replace(/&amp;/g, '&'));
}

function sharePage(s: Survey, interpretation: Interpretation, section = '<svg></svg>', plot = '<svg></svg>'): string {
  return renderSharePage({
    survey: s, interpretation, name: 'Check', revision: 1, storedAt: '2026-12-05T05:07:09.000Z', timeZone: 'UTC',
    sectionSheets: [section], travelTimesSvg: plot, cautions: CAUTIONS, stationsCsvUrl: 'stations.csv',
  });
}

beforeAll(() => {
  survey = validateSurvey(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8'))).survey!;
  demo = interpret(survey);
  sectionSvg = renderSection(survey, demo);
  travelTimesSvg = renderTravelTimes(survey, demo);
});

describe('the drawings and the tables format alike', () => {
  it('formats velocities, lengths and times in the drawings exactly as the page does', () => {
    for (const v of [0, 4.9, 5, 698, 2449.6, 2801, 12480, 99995]) expect(formatVelocity(v)).toBe(`${velocity(v)} m/s`);
    for (const m of [0, -0.04, 0.05, 2.25, 3.14159, 123.456]) expect(formatMetres(m)).toBe(`${metres(m)} m`);
    for (const t of [0, 0.04, 0.06, 13.95, 31.2]) expect(formatMs(t)).toBe(`${milliseconds(t)} ms`);
    // The stated precision itself (the drawing convention kept by the one table): 10 m/s, 0.1 m, 0.1 ms.
    expect(DISPLAY_PRECISION).toEqual({ metreDecimals: 1, millisecondDecimals: 1, degreeDecimals: 1, velocityStepMPerS: 10 });
    expect(velocity(2801)).toBe('2,800');
    expect(velocity(698)).toBe('700');
  });

  it('writes each layer velocity of the demo line the same on the section, the share page and the page summary words', () => {
    const texts = svgTexts(sectionSvg).join('\n');
    const page = sharePage(survey, demo);
    demo.layers.forEach((layer, i) => {
      const words = `layer ${i + 1}: ${velocity(layer.velocity)} m/s`;
      expect(texts, words).toContain(words);
      expect(page, words).toContain(words);
    });
    // The demo line's raw numbers differ from the shown ones (698 / 2801 m/s): the test would
    // pass trivially if they did not.
    expect(demo.layers.map((l) => l.velocity)).not.toEqual(demo.layers.map((l) => Math.round(l.velocity / 10) * 10));
  });

  it('gives the refractor velocity bar of the section the same digits as the table and stations.csv', () => {
    const texts = svgTexts(sectionSvg);
    const column = stationColumns(demo.stations).find((c) => c.key === 'refractorVelocity')!;
    const csvRows = stationsCsv(demo).trimEnd().split('\r\n').map((r) => r.split(','));
    const csvIndex = csvRows[0].indexOf('refractor_velocity_m_per_s');
    for (const segment of demo.refractorVelocity) {
      const label = formatVelocity(segment.velocity);
      expect(texts, label).toContain(label);
      const inside = demo.stations
        .map((s, i) => ({ s, i }))
        .filter(({ s }) => s.x >= segment.from && s.x <= segment.to && s.refractorVelocity !== null);
      expect(inside.length).toBeGreaterThan(0);
      for (const { s, i } of inside) {
        if (s.refractorVelocity !== segment.velocity) continue;
        expect(`${cellText(column, s)} m/s`).toBe(label);
        expect(csvRows[i + 1][csvIndex]).toBe(label.replace(/,/g, '').replace(' m/s', ''));
      }
    }
  });

  it('quotes reciprocal differences on the plot with the page\'s decimals', () => {
    const texts = svgTexts(travelTimesSvg).join('\n');
    for (const check of demo.qc.reciprocal) {
      expect(texts).toContain(`Δ ${milliseconds(Math.abs(check.differenceMs))} ms`);
    }
  });

  it('shows every cell of the share page with the page\'s own text and the file with the same digits', () => {
    const page = sharePage(survey, demo);
    const columns = stationColumns(demo.stations);
    const depth = columns.find((c) => c.key === 'depth')!;
    for (const s of demo.stations) {
      expect(page).toContain(`<td>${cellText(depth, s)}</td>`);
      expect(cellText(depth, s)).toMatch(/^\d+\.\d$/);
      expect(cellData(depth, s)).toBe(cellText(depth, s));
    }
  });
});

describe('the warnings speak with the same numbers', () => {
  /** Every "N m/s" of a text, as written (e.g. "2,800"). */
  const velocitiesIn = (text: string): string[] => [...text.matchAll(/(\d[\d,]*) m\/s/g)].map((m) => m[1]);

  it('quote the demo line\'s layer velocities as the section and the table do (700 / 2,800 m/s, not 698 / 2801)', () => {
    const hidden = demo.qc.warnings.find((w) => w.code === 'hidden-layer')!;
    expect(hidden.message).toContain(`between ${velocity(demo.layers[0].velocity)} and ${velocity(demo.layers[1].velocity)} m/s`);
    // The raw numbers differ from the shown ones, so the check above could fail.
    expect(String(demo.layers[0].velocity)).not.toBe(velocity(demo.layers[0].velocity));
    expect(hidden.message).not.toContain(`${demo.layers[1].velocity} m/s`);
  });

  it('never print a velocity finer than 10 m/s or a length or time finer than 0.1, on any recorded line', () => {
    const folder = new URL('../golden/lines/', import.meta.url);
    let velocities = 0;
    for (const file of readdirSync(folder).filter((f) => f.endsWith('.json'))) {
      const line = JSON.parse(readFileSync(new URL(file, folder), 'utf8')) as { interpretation?: Interpretation };
      for (const w of line.interpretation?.qc?.warnings ?? []) {
        for (const v of velocitiesIn(w.message)) {
          velocities += 1;
          const n = Number(v.replace(/,/g, ''));
          expect(n % DISPLAY_PRECISION.velocityStepMPerS, `${file}: ${w.message}`).toBe(0);
          expect(v, `${file}: ${w.message}`).toBe(velocity(n));
        }
        // A length or time with two or more decimals ("4.40 ms", "46.45 m") is finer than the page shows.
        expect(w.message, file).not.toMatch(/\d\.\d{2,} (m|ms)\b/);
      }
    }
    expect(velocities).toBeGreaterThan(10);
  });
});

describe('the engine depends on nothing of the page', () => {
  it('imports nothing from web/ or server/ anywhere under engine/ (DESIGN.md: the engine never imports from server/ or web/)', () => {
    const root = new URL('../../engine/', import.meta.url);
    const files = (readdirSync(root, { recursive: true }) as string[]).filter((f) => /\.(ts|js)$/.test(f));
    expect(files.length).toBeGreaterThan(50);
    for (const file of files) {
      const source = readFileSync(new URL(file, root), 'utf8');
      expect(source, file).not.toMatch(/from\s+['"][^'"]*\/(web|server)\//);
    }
  });
});

describe('the share page', () => {
  it('shows the depth to every refractor on a three-layer line, with the page\'s numbers', () => {
    const line = JSON.parse(readFileSync(new URL('../golden/lines/engine-second-refractor-01.json', import.meta.url), 'utf8')) as { survey: Survey; interpretation: Interpretation };
    const page = sharePage(line.survey, line.interpretation);
    const ranges = refractorDepthRanges(line.interpretation.stations);
    expect(ranges.map((r) => r.label)).toEqual(['Depth to refractor 1', 'Depth to refractor 2']);
    for (const r of ranges) {
      expect(r.text).toMatch(/^\d+\.\d(–\d+\.\d)? m$/);
      expect(page).toContain(`<dt>${r.label}</dt><dd>${r.text}</dd>`);
    }
    // The range is the least and greatest depth over the stations, shown to 0.1 m.
    const second = line.interpretation.stations.map((s) => s.depths[1]).filter((d): d is number => typeof d === 'number');
    expect(ranges[1].text).toBe(`${metres(Math.min(...second))}–${metres(Math.max(...second))} m`.replace(/^(\S+)–\1 m$/, '$1 m'));
    expect(page).toContain('Depth to refractor 2');
    expect(page).toContain(`layer 3: ${velocity(line.interpretation.layers[2].velocity)} m/s`);
  });

  it('writes dates in words, not as ISO timestamps', () => {
    expect(readableTime('2026-12-05T05:07:09.000Z', 'UTC')).toBe('5 December 2026 at 05:07 UTC');
    expect(readableTime('2026-07-01T22:30:00.000Z', 'Europe/Berlin')).toBe('2 July 2026 at 00:30 CEST');
    expect(readableTime('not a date', 'UTC')).toBe('not a date');
    expect(readableSurveyDate('2024-05-14')).toBe('shot on 14 May 2024');
    expect(readableSurveyDate('2024-02-30')).toBe('2024-02-30');
    expect(readableSurveyDate('spring 2024, crew B')).toBe('spring 2024, crew B');
    const page = sharePage({ ...survey, date: '2024-05-14' }, demo);
    expect(page).toContain('<time datetime="2026-12-05T05:07:09.000Z">5 December 2026 at 05:07 UTC</time>');
    expect(page).toContain(' · shot on 14 May 2024');
    expect(page).not.toMatch(/>\s*2026-12-05T/);
  });

  it('gives the hidden-layer allowance once, in calm words with its numbers, and not again among the warnings', () => {
    const note = hiddenLayerNote(demo);
    expect(note).not.toBeNull();
    const extras = demo.stations
      .filter((s) => typeof s.hiddenLayerDepth === 'number' && typeof s.depth === 'number')
      .map((s) => (s.hiddenLayerDepth as number) - (s.depth as number));
    expect(extras.length).toBeGreaterThan(0);
    expect(note!.headline).toContain(`up to ${metres(Math.max(...extras))} m deeper than drawn`);
    expect(note!.headline).not.toMatch(/warning|danger|!/i);
    const page = sharePage(survey, demo);
    const hiddenMessage = demo.qc.warnings.find((w) => w.code === 'hidden-layer')!.message;
    expect(page.split(hiddenMessage.slice(0, 40).replace(/&/g, '&amp;')).length - 1).toBe(1);
    expect(otherWarnings(demo.qc.warnings).some((w) => w.code === 'hidden-layer')).toBe(false);
  });
});
