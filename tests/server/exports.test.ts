// Exports of a stored line (api-v1.md): section.pdf, section.png, traveltimes.pdf,
// traveltimes.png; and ours, methods.pdf and methods.png. The files are read back with general-purpose readers
// (tests/helpers/read-export.ts: pdf.js for PDF, the PNG chunk layout for PNG).
// Paper sizes: ISO 216 (A4 297 × 210 mm, A3 420 × 297 mm), in PDF points of 1/72 in
// (ISO 32000-1 §8.3.2.3, the default user-space unit).
import { readFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { findExportFonts } from '../../server/export/export-fonts.js';
import { sectionSheets } from '../../server/export/section-pages.js';
import { sheetsToPdf } from '../../server/export/pdf-document.js';
import { sheetToPng } from '../../server/export/png-image.js';
import { renderTravelTimes } from '../../engine/render/index.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import { byRole, parseSvg } from '../helpers/render-fixture.js';
import { PNG_SIGNATURE, readPdf, readPng, type PdfPage } from '../helpers/read-export.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
const demoName: string = JSON.parse(demoJsonText).name;

const MM_PER_INCH = 25.4;
const PT_PER_MM = 72 / MM_PER_INCH;
/** ISO 216 sheets, landscape, pt. */
const A4_PT = { width: 297 * PT_PER_MM, height: 210 * PT_PER_MM };
const A3_PT = { width: 420 * PT_PER_MM, height: 297 * PT_PER_MM };

let app: FastifyInstance;
let id: string;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
  const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
  expect(res.status).toBe(201);
  id = res.body.id;
});
afterAll(async () => {
  await app.close();
});

/** GET with the body kept as bytes whatever the type. */
function getFile(path: string) {
  return request(app.server)
    .get(path)
    .buffer(true)
    .parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    });
}

/** The texts of an SVG drawing, whitespace collapsed, in document order. */
function svgTexts(svg: string): string[] {
  return Array.from(parseSvg(svg).querySelectorAll('text'))
    .map((t) => (t.textContent ?? '').replace(/\s+/g, ' ').trim())
    .filter((t) => t !== '');
}

const pageTexts = (page: PdfPage): string[] => page.items.map((i) => i.str.replace(/\s+/g, ' ').trim());

describe('each export route answers with its file type', () => {
  const cases: [string, string, RegExp][] = [
    ['section.pdf', 'application/pdf', /-r1-section\.pdf"$/],
    ['section.png', 'image/png', /-r1-section\.png"$/],
    ['traveltimes.pdf', 'application/pdf', /-r1-traveltimes\.pdf"$/],
    ['traveltimes.png', 'image/png', /-r1-traveltimes\.png"$/],
    ['methods.pdf', 'application/pdf', /-r1-methods\.pdf"$/],
    ['methods.png', 'image/png', /-r1-methods\.png"$/],
  ];
  for (const [file, type, name] of cases) {
    it(`${file}: ${type}, an attachment named after the line and revision`, async () => {
      const res = await getFile(`/api/v1/surveys/${id}/${file}`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe(type);
      expect(res.headers['content-disposition']).toMatch(/^attachment; filename="Demo-A-pump-station-terrace/);
      expect(res.headers['content-disposition']).toMatch(name);
      expect(Number(res.headers['arcline-sheet-count'])).toBeGreaterThanOrEqual(1);
      const body = res.body as Buffer;
      // PDF files start with "%PDF-" (ISO 32000-1 §7.5.2); PNG with its signature (ISO/IEC 15948 §5.2).
      if (type === 'application/pdf') expect(body.subarray(0, 5).toString('latin1')).toBe('%PDF-');
      else expect([...body.subarray(0, 8)]).toEqual(PNG_SIGNATURE);
    });
  }
});

describe('section.pdf', () => {
  it('opens, has one page per sheet, each A4 landscape by default and A3 landscape on request', async () => {
    for (const [query, size] of [['', A4_PT], ['?paper=A3', A3_PT], ['?paper=a4', A4_PT]] as const) {
      const res = await getFile(`/api/v1/surveys/${id}/section.pdf${query}`);
      expect(res.status, query).toBe(200);
      const pdf = await readPdf(res.body);
      const sheets = Number(res.headers['arcline-sheet-count']);
      expect(pdf.pages.length, query).toBe(sheets);
      for (const page of pdf.pages) {
        expect(page.widthPt, query).toBeCloseTo(size.width, 2);
        expect(page.heightPt, query).toBeCloseTo(size.height, 2);
      }
    }
  });

  it("holds the title and every label of the drawing in its text layer, each once (halos are not text)", async () => {
    const res = await getFile(`/api/v1/surveys/${id}/section.pdf`);
    const pdf = await readPdf(res.body);
    expect(pdf.title).toBe(`Depth section — ${demoName}`);
    const stored = app.store.getRevision(id);
    const sheets = sectionSheets(stored!.survey, stored!.interpretation, { paper: 'A4', showArcs: true });
    expect(pdf.pages.length).toBe(sheets.length);
    sheets.forEach((sheet, n) => {
      const texts = pageTexts(pdf.pages[n]);
      expect(texts).toContain(demoName);
      // Every text of the sheet, and nothing twice: a halo drawn as text would double its label.
      expect([...texts].sort()).toEqual(svgTexts(sheet).sort());
      // The depth labels of the elevation axis, as the drawing states them.
      const depthTicks = byRole(parseSvg(sheet), 'y-tick').map((tick) => tick.getAttribute('data-value')!);
      expect(depthTicks.length).toBeGreaterThanOrEqual(2);
      for (const value of depthTicks) expect(texts).toContain(value);
    });
  });

  it('prints an A4 sheet at the size it was drawn: 1 mm of the drawing is 72/25.4 pt on the page', async () => {
    const res = await getFile(`/api/v1/surveys/${id}/section.pdf`);
    const pdf = await readPdf(res.body);
    const stored = app.store.getRevision(id)!;
    const sheet = parseSvg(sectionSheets(stored.survey, stored.interpretation, { paper: 'A4', showArcs: true })[0]);
    // The title's font size (mm in the drawing) is its size on paper.
    const titleMm = Number(byRole(sheet, 'title')[0].getAttribute('font-size'));
    const title = pdf.pages[0].items.find((item) => item.str === demoName)!;
    expect(title.sizePt).toBeCloseTo(titleMm * PT_PER_MM, 2);
    // The distance between two x-axis tick labels on the page equals their distance in the drawing.
    const ticks = byRole(sheet, 'x-tick');
    const first = ticks[0];
    const last = ticks[ticks.length - 1];
    const drawnMm = Number(last.getAttribute('x1')) - Number(first.getAttribute('x1'));
    const centre = (label: string): number => {
      const item = pdf.pages[0].items.find((i) => i.str === label && i.y < A4_PT.height / 2)!;
      return item.x + item.width / 2;
    };
    const printedPt = centre(last.getAttribute('data-value')!) - centre(first.getAttribute('data-value')!);
    expect(printedPt).toBeCloseTo(drawnMm * PT_PER_MM, 0);
  });

  it('embeds the font it sets the labels in, when the machine has one (fonts-liberation)', async () => {
    const fonts = findExportFonts();
    const res = await getFile(`/api/v1/surveys/${id}/section.pdf`);
    const pdf = await readPdf(res.body);
    expect(pdf.fonts.length).toBeGreaterThan(0);
    if (fonts === null) expect(pdf.fonts.every((f) => !f.endsWith('(embedded)'))).toBe(true);
    else for (const font of pdf.fonts) expect(font).toMatch(new RegExp(`${fonts.family.replace(/ /g, '')}.*\\(embedded\\)$`));
  });

  it('is the same file every time for the same revision (the creation date is the revision\'s)', async () => {
    const a = await getFile(`/api/v1/surveys/${id}/section.pdf`);
    const b = await getFile(`/api/v1/surveys/${id}/section.pdf`);
    expect(Buffer.compare(a.body, b.body)).toBe(0);
  });
});

describe('traveltimes.pdf', () => {
  it('is one page of the chosen paper holding the title and the shot names', async () => {
    for (const [query, size] of [['', A4_PT], ['?paper=A3', A3_PT]] as const) {
      const res = await getFile(`/api/v1/surveys/${id}/traveltimes.pdf${query}`);
      expect(res.status).toBe(200);
      const pdf = await readPdf(res.body);
      expect(pdf.pages).toHaveLength(1);
      expect(pdf.pages[0].widthPt).toBeCloseTo(size.width, 2);
      expect(pdf.pages[0].heightPt).toBeCloseTo(size.height, 2);
      const texts = pageTexts(pdf.pages[0]);
      expect(texts).toContain(demoName);
      for (const shot of JSON.parse(demoJsonText).shots as { id: string }[]) expect(texts).toContain(shot.id);
    }
  });

  it('enlarges the A4 plot to fill A3 inside 10 mm margins: the title grows by the width ratio 400/277', async () => {
    const a4 = await readPdf((await getFile(`/api/v1/surveys/${id}/traveltimes.pdf`)).body);
    const a3 = await readPdf((await getFile(`/api/v1/surveys/${id}/traveltimes.pdf?paper=A3`)).body);
    const size = (pdf: typeof a4): number => pdf.pages[0].items.find((i) => i.str === demoName)!.sizePt;
    // A4 landscape less 10 mm a side is 277 mm wide, A3's 400 mm; heights 190 and 277 mm allow more.
    expect(size(a3) / size(a4)).toBeCloseTo(400 / 277, 3);
  });
});

describe('methods.pdf', () => {
  it('is one page of the chosen paper holding the comparison\'s title, its three methods and every caution', async () => {
    for (const [query, size] of [['', A4_PT], ['?paper=A3', A3_PT]] as const) {
      const res = await getFile(`/api/v1/surveys/${id}/methods.pdf${query}`);
      expect(res.status).toBe(200);
      expect(res.headers['arcline-sheet-count']).toBe('1');
      const pdf = await readPdf(res.body);
      expect(pdf.title).toBe(`Methods compared — ${demoName}`);
      expect(pdf.pages).toHaveLength(1);
      expect(pdf.pages[0].widthPt).toBeCloseTo(size.width, 2);
      expect(pdf.pages[0].heightPt).toBeCloseTo(size.height, 2);
      // The same texts as methods.svg, each once; the cautions' wrapped lines read back as their full text.
      const svg = (await request(app.server).get(`/api/v1/surveys/${id}/methods.svg`).buffer(true).parse((r, done) => {
        let text = '';
        r.on('data', (c: Buffer) => (text += c.toString('utf8')));
        r.on('end', () => done(null, text));
      })).body as string;
      const texts = pageTexts(pdf.pages[0]);
      expect([...texts].sort()).toEqual(svgTexts(svg).sort());
      const words = texts.join(' ').replace(/\s+/g, ' ');
      for (const caution of CAUTIONS) expect(words).toContain(caution);
    }
  });
});

describe('PNG exports', () => {
  it('are the drawing at the requested dpi: width = 277 mm × dpi / 25.4 px (A4 less its margins), and say so in pHYs', async () => {
    for (const [file, dpi] of [['section.png', 96], ['section.png', undefined], ['traveltimes.png', 200], ['methods.png', 100]] as const) {
      const res = await getFile(`/api/v1/surveys/${id}/${file}${dpi === undefined ? '' : `?dpi=${dpi}`}`);
      expect(res.status).toBe(200);
      const png = readPng(res.body);
      const used = dpi ?? 150; // the documented default
      expect(png.width, file).toBe(Math.round((277 * used) / MM_PER_INCH));
      expect(png.height, file).toBe(Math.round((190 * used) / MM_PER_INCH));
      expect(png.pixelsPerMetre).toBe(Math.round(used / 0.0254));
      expect(png.chunkTypes[0]).toBe('IHDR');
      expect(png.chunkTypes.at(-1)).toBe('IEND');
      // A drawing, not a blank page: ink on a few per cent of the pixels.
      expect(png.darkShare).toBeGreaterThan(0.005);
      expect(png.darkShare).toBeLessThan(0.3);
    }
  });
});

describe('bad requests', () => {
  const bad: [string, string][] = [
    ['section.pdf?paper=B5', '/paper'],
    ['section.pdf?paper=', '/paper'],
    ['traveltimes.pdf?paper=letter', '/paper'],
    ['section.pdf?scale=10', '/scale'],
    ['section.pdf?scale=1.5e6', '/scale'],
    ['section.pdf?scale=abc', '/scale'],
    ['section.pdf?scale=500.5', '/scale'],
    ['section.png?exaggeration=0.5', '/exaggeration'],
    ['section.pdf?exaggeration=100', '/exaggeration'],
    ['section.pdf?arcs=maybe', '/arcs'],
    ['section.png?dpi=20', '/dpi'],
    ['section.png?dpi=1200', '/dpi'],
    ['traveltimes.png?dpi=abc', '/dpi'],
    ['section.png?sheet=0', '/sheet'],
    ['section.pdf?revision=0', '/revision'],
    ['traveltimes.png?revision=x', '/revision'],
  ];
  for (const [query, path] of bad) {
    it(`${query} → 400 naming ${path.slice(1)}`, async () => {
      const res = await request(app.server).get(`/api/v1/surveys/${id}/${query}`);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_request');
      expect(res.body.error.path).toBe(path);
      expect(res.body.error.message).toContain(`"${path.slice(1)}"`);
    });
  }

  it('names the allowed paper sizes', async () => {
    const res = await request(app.server).get(`/api/v1/surveys/${id}/section.pdf?paper=B5`);
    expect(res.body.error.message).toMatch(/A4.*A3/);
  });

  it('refuses a sheet past the last with 400 naming sheet and the count', async () => {
    const probe = await getFile(`/api/v1/surveys/${id}/section.png?dpi=72`);
    const count = Number(probe.headers['arcline-sheet-count']);
    const res = await request(app.server).get(`/api/v1/surveys/${id}/section.png?sheet=${count + 1}`);
    expect(res.status).toBe(400);
    expect(res.body.error.path).toBe('/sheet');
    expect(res.body.error.message).toContain(`has ${count} sheet`);
  });

  it('answers 404 for an unknown line and an unknown revision, on every export route', async () => {
    for (const file of ['section.pdf', 'section.png', 'traveltimes.pdf', 'traveltimes.png']) {
      const unknown = await request(app.server).get(`/api/v1/surveys/AAAAAAAAAAAAAAAA/${file}`);
      expect(unknown.status, file).toBe(404);
      expect(unknown.body.error.code).toBe('survey_not_found');
      const noRevision = await request(app.server).get(`/api/v1/surveys/${id}/${file}?revision=9`);
      expect(noRevision.status, file).toBe(404);
      expect(noRevision.body.error.code).toBe('revision_not_found');
    }
  });
});

describe('limits', () => {
  it('runs under the compute time limit like every drawing: 422 compute_time_limit when it is too short', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'arcline-export-'));
    try {
      const storing = await buildApp({ dataDir: dir });
      await storing.ready();
      const created = await request(storing.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
      await storing.close();
      const hurried = await buildApp({ dataDir: dir, compute: { threads: 1, timeLimitMs: 1 } });
      await hurried.ready();
      try {
        const res = await request(hurried.server).get(`/api/v1/surveys/${created.body.id}/section.pdf`);
        expect(res.status).toBe(422);
        expect(res.body.error.code).toBe('compute_time_limit');
      } finally {
        await hurried.close();
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('without font files', () => {
  it('still writes a PDF whose text layer holds the title (standard Helvetica, not embedded) and a PNG of the right size', async () => {
    const stored = app.store.getRevision(id)!;
    const svg = renderTravelTimes(stored.survey, stored.interpretation);
    const result = await sheetsToPdf([svg], 'A4', { title: 't', subject: 's', createdAt: stored.createdAt }, null);
    const pdf = await readPdf(result.bytes);
    expect(pageTexts(pdf.pages[0])).toContain(demoName);
    expect(pdf.fonts.some((f) => /Helvetica/.test(f) && !f.endsWith('(embedded)'))).toBe(true);
    const png = readPng(sheetToPng(svg, 72, null).bytes);
    expect(png.width).toBe(Math.round((277 * 72) / MM_PER_INCH));
  });

  it('finds no fonts in a folder without them', () => {
    expect(findExportFonts([tmpdir() + '/no-such-font-folder'])).toBeNull();
  });
});

describe('preparing a sheet for the PDF', () => {
  // resvg (an independent SVG renderer) draws the sheet both ways: a rectangular clip-path
  // and the nested viewport that replaces it must give the same picture.
  it('draws the same pixels with the clips turned into viewports as with the clip-paths', async () => {
    const { Resvg } = await import('@resvg/resvg-js');
    const { clipRectsAsViewports } = await import('../../server/export/svg-sheet.js');
    const stored = app.store.getRevision(id)!;
    const opts = { paper: 'A4' as const, showArcs: true };
    for (const svg of [sectionSheets(stored.survey, stored.interpretation, opts)[0], renderTravelTimes(stored.survey, stored.interpretation)]) {
      const pixels = (text: string) => new Resvg(text, { dpi: 72 }).render().pixels;
      const differing = (a: Buffer, b: Buffer) => a.reduce((n, byte, i) => n + (byte === b[i] ? 0 : 1), 0);
      const asDrawn = pixels(svg);
      const converted = clipRectsAsViewports(svg);
      expect(converted).not.toContain('clip-path=');
      // The clips matter on these drawings: without them thousands of bytes change…
      const unclipped = differing(asDrawn, pixels(svg.replace(/ clip-path="[^"]*"/g, '')));
      expect(unclipped).toBeGreaterThan(1000);
      // …and the viewports reproduce them but for anti-aliasing along the clip edge.
      expect(differing(asDrawn, pixels(converted))).toBeLessThan(unclipped / 50);
    }
  });

  it('turns label halos into outline paths and leaves each label as text once', async () => {
    const { outlineHalos } = await import('../../server/export/halo-outlines.js');
    const fonts = findExportFonts();
    const stored = app.store.getRevision(id)!;
    const svg = renderTravelTimes(stored.survey, stored.interpretation);
    const haloed = (svg.match(/paint-order="stroke"/g) ?? []).length;
    expect(haloed).toBeGreaterThan(0);
    const { svg: prepared, outlined } = outlineHalos(svg, fonts);
    expect(prepared).not.toContain('paint-order');
    expect(outlined).toBe(fonts === null ? 0 : haloed);
    expect(svgTexts(prepared)).toEqual(svgTexts(svg));
    // An outline lies where its label is: its first point within a label's width of the text's anchor.
    if (fonts !== null) {
      const root = parseSvg(prepared);
      for (const halo of byRole(root, 'label-halo')) {
        const text = halo.nextElementSibling!;
        const [, x0, y0] = /^M(-?[\d.]+) (-?[\d.]+)/.exec(halo.getAttribute('d')!)!.map(Number);
        const size = Number(text.getAttribute('font-size'));
        const width = (text.textContent ?? '').length * size;
        expect(Math.abs(x0 - Number(text.getAttribute('x')))).toBeLessThan(width);
        expect(Math.abs(y0 - Number(text.getAttribute('y')))).toBeLessThan(size * 1.2);
      }
    }
  });
});

/**
 * Issue 11 "done means": a 240-geophone, 12-shot line on A3 landscape at a stated scale,
 * downloaded as one PDF page per sheet (renderSectionSheets pages long lines at match lines).
 * The sheet count is checked against the renderer's own plan for the same options, and each
 * page against ISO 216 A3 in points.
 */
describe('a long line as a multi-page PDF', () => {
  let longId: string;
  beforeAll(async () => {
    const { longLine } = await import('../helpers/long-lines.js');
    const survey = longLine({ geophones: 240, spacingM: 5, shots: 12 });
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(JSON.stringify({ ...survey, name: 'long line 240 x 5 m' }));
    expect(res.status).toBe(201);
    longId = res.body.id;
  });

  it('section.pdf at A3 1:2500: one A3 page per sheet, as many as the sheet renderer draws, more than one', async () => {
    const res = await getFile(`/api/v1/surveys/${longId}/section.pdf?paper=A3&scale=2500`);
    expect(res.status).toBe(200);
    const stored = await request(app.server).get(`/api/v1/surveys/${longId}`);
    const sheets = sectionSheets(stored.body.survey, stored.body.interpretation, { paper: 'A3', scale: 2500, showArcs: true });
    expect(sheets.length).toBeGreaterThan(1);
    const pdf = await readPdf(res.body);
    expect(pdf.pages.length).toBe(sheets.length);
    expect(Number(res.headers['arcline-sheet-count'])).toBe(sheets.length);
    for (const page of pdf.pages) {
      expect(page.widthPt).toBeCloseTo(A3_PT.width, 2);
      expect(page.heightPt).toBeCloseTo(A3_PT.height, 2);
      expect(pageTexts(page).join(' ')).toContain('1:2,500');
    }
  });

  it('a section too tall for the sheet at the asked exaggeration is a 400 naming exaggeration', async () => {
    const res = await request(app.server).get(`/api/v1/surveys/${longId}/section.pdf?scale=50&exaggeration=20`);
    expect(res.status).toBe(400);
    expect(res.body.error.path).toMatch(/^\/(exaggeration|scale)$/);
  });
});

describe('exports of a shared line (/share/:token/…)', () => {
  it('serve the latest revision\'s PDF and PNG, are linked from the share page, and stop with the link', async () => {
    const posted = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
    expect(posted.status).toBe(201);
    const shareUrl: string = posted.body.shareUrl;
    const path = new URL(shareUrl, 'http://localhost').pathname;
    const page = await request(app.server).get(path);
    expect(page.text).toContain(`${path}/section.pdf`);
    expect(page.text).toContain(`${path}/traveltimes.png`);
    expect(page.text).toContain(`${path}/methods.pdf`);
    const pdf = await getFile(`${path}/section.pdf?paper=A3`);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['cache-control']).toBe('no-store');
    const read = await readPdf(pdf.body);
    expect(read.pages.length).toBe(Number(pdf.headers['arcline-sheet-count']));
    expect(read.pages[0].widthPt).toBeCloseTo(A3_PT.width, 2);
    const png = await getFile(`${path}/traveltimes.png?dpi=72`);
    expect(png.status).toBe(200);
    expect(readPng(png.body).width).toBeGreaterThan(0);
    const methodsPng = await getFile(`${path}/methods.png?dpi=72`);
    expect(methodsPng.status).toBe(200);
    expect(methodsPng.headers['cache-control']).toBe('no-store');
    // 277 mm at 72 dpi (A4 less its margins, as every single-sheet drawing).
    expect(readPng(methodsPng.body).width).toBe(Math.round((277 * 72) / MM_PER_INCH));
    expect((await request(app.server).delete(`/api/v1/surveys/${posted.body.id}/share`)).status).toBeLessThan(300);
    for (const file of ['section.pdf', 'methods.pdf', 'methods.png']) expect((await request(app.server).get(`${path}/${file}`)).status, file).toBe(404);
  });
});
