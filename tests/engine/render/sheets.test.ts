/**
 * The depth section as sheets: labels that never overprint, a value under every geophone or
 * on the stated interval, a scale bar true to the axis, long lines paged at match lines, and
 * the option validator. Lines: closed-form planar arrivals (tests/helpers/long-lines.ts;
 * Kearey, Brooks & Hill 2002, ch. 5) interpreted by the engine.
 */
import { describe, expect, it } from 'vitest';
import { renderSection, renderSectionSheet, renderSectionSheets, sectionSheetCount, sectionSheetOptionProblems, SectionSheetError, SHEET_LIMITS } from '../../../engine/render/index.js';
import { interpret } from '../../../engine/pipeline/interpret.js';
import { longLine } from '../../helpers/long-lines.js';
import { axisMap, byRole, parseSvg, renderFixture } from '../../helpers/render-fixture.js';
import type { Survey } from '../../../engine/survey/survey.js';
import type { Interpretation } from '../../../engine/output/interpretation.js';

/** ISO 216 A4 and A3 (297 × 210, 420 × 297 mm) less 10 mm printer margins: the drawing areas. */
const PAPER_MM = { A4: [277, 190], A3: [400, 277] } as const;

function line(geophones: number, spacingM: number, shots: number): { survey: Survey; interpretation: Interpretation } {
  const survey = longLine({ geophones, spacingM, shots, noiseMs: 0.2 });
  survey.options = { residuals: false };
  return { survey, interpretation: interpret(survey) };
}

const LINE_480 = line(480, 5, 12);
const LINE_10_SHOTS = line(96, 2, 10);

function textOf(el: Element): string {
  return (el.textContent ?? '').replace(/\s+/g, ' ').trim();
}

/** Roles of the horizontal labels a reader reads; each must keep clear of every other. */
const LABEL_ROLES = [
  'geophone-row-label', 'depth-row-label', 'depth-2-row-label', 'velocity-label', 'shot-label', 'shot-off-sheet', 'layer-label',
  'step-label', 'velocity-change-label', 'match-label', 'x-tick-label', 'y-tick-label', 'scale-bar-label', 'row-caption', 'label-interval', 'scale-statement',
];

interface Box { x0: number; y0: number; x1: number; y1: number; role: string; text: string }

/**
 * A text's box from its attributes: width at 0.5 em per character (Helvetica/Arial's mean
 * advance for mixed-case text and digits is about 0.5 em; from memory), height from the
 * baseline up 0.72 em (cap height) and down 0.2 em (descenders).
 */
function textBox(el: Element): Box {
  const size = Number(el.getAttribute('font-size'));
  const x = Number(el.getAttribute('x')) + Number(el.getAttribute('dx') ?? 0);
  const y = Number(el.getAttribute('y'));
  const text = el.textContent ?? '';
  const width = text.length * size * 0.5;
  const anchor = el.getAttribute('text-anchor') ?? 'start';
  const x0 = anchor === 'middle' ? x - width / 2 : anchor === 'end' ? x - width : x;
  return { x0, x1: x0 + width, y0: y - size * 0.72, y1: y + size * 0.2, role: el.getAttribute('data-role') ?? '', text };
}

function overlaps(a: Box, b: Box): boolean {
  return Math.min(a.x1, b.x1) - Math.max(a.x0, b.x0) > 0.05 && Math.min(a.y1, b.y1) - Math.max(a.y0, b.y0) > 0.05;
}

function labelCollisions(svg: string): string[] {
  const root = parseSvg(svg);
  const boxes = LABEL_ROLES.flatMap((role) => byRole(root, role)).filter((el) => el.nodeName.toLowerCase() === 'text' && !el.getAttribute('transform')).map(textBox);
  const found: string[] = [];
  for (let i = 0; i < boxes.length; i++) {
    for (let j = i + 1; j < boxes.length; j++) {
      if (overlaps(boxes[i], boxes[j])) found.push(`${boxes[i].role} "${boxes[i].text}" × ${boxes[j].role} "${boxes[j].text}"`);
    }
  }
  return found;
}

describe('renderSectionSheets: labels', () => {
  for (const [label, fixture] of [['480-geophone line', LINE_480], ['10-shot line', LINE_10_SHOTS]] as const) {
    for (const paper of ['A4', 'A3'] as const) {
      it(`${label} on ${paper}: no two labels' boxes overlap on any sheet`, () => {
        const sheets = renderSectionSheets(fixture.survey, fixture.interpretation, { paper });
        expect(sheets.length).toBeGreaterThan(0);
        for (const svg of sheets) expect(labelCollisions(svg)).toEqual([]);
      });
    }
  }

  it('every geophone carries its number and depth, or lies off the stated interval; the depth written is the station depth to 0.1 m', () => {
    for (const fixture of [LINE_480, LINE_10_SHOTS]) {
      const sheets = renderSectionSheets(fixture.survey, fixture.interpretation, { paper: 'A4' }).map(parseSvg);
      const intervals = sheets.map((root) => Number(byRole(root, 'label-interval')[0].getAttribute('data-interval')));
      const n = intervals[0];
      expect(new Set(intervals).size).toBe(1);
      const stated = textOf(byRole(sheets[0], 'label-interval')[0]);
      expect(stated).toMatch(n === 1 ? /every geophone/ : new RegExp(`every ${n}(st|nd|rd|th) geophone`));
      const depthAt = new Map<number, string>();
      const numberAt = new Map<number, string>();
      for (const root of sheets) {
        for (const el of byRole(root, 'depth-row-label')) depthAt.set(Number(el.getAttribute('data-index')), textOf(el));
        for (const el of byRole(root, 'geophone-row-label')) numberAt.set(Number(el.getAttribute('data-index')), textOf(el));
      }
      fixture.survey.geophones.forEach((_, i) => {
        if (i % n !== 0) {
          expect(depthAt.has(i)).toBe(false);
          return;
        }
        expect(numberAt.get(i)).toBe(String(i + 1));
        const station = fixture.interpretation.stations[i];
        const written = depthAt.get(i);
        expect(written).toBeDefined();
        if (station.depth === null) expect(written).toBe('–');
        else expect(written!.replace(/[()~]/g, '')).toBe(station.depth.toFixed(1));
      });
    }
  });
});

describe('renderSectionSheets: scale', () => {
  it('the scale bar is as long as its metres on the chainage axis, and the stated 1:n is true on paper (1 unit = 1 mm)', () => {
    for (const [fixture, options] of [[LINE_480, { paper: 'A3' as const }], [LINE_10_SHOTS, {}], [renderFixture(), { scale: 200 }]] as const) {
      for (const svg of renderSectionSheets(fixture.survey, fixture.interpretation, options)) {
        const root = parseSvg(svg);
        const x = axisMap(root, 'x-tick');
        const bar = byRole(root, 'scale-bar')[0];
        const parts = byRole(bar, 'scale-bar-part');
        const start = Math.min(...parts.map((p) => Number(p.getAttribute('x'))));
        const end = Math.max(...parts.map((p) => Number(p.getAttribute('x')) + Number(p.getAttribute('width'))));
        const metres = Number(bar.getAttribute('data-length-m'));
        expect(Math.abs(end - start - metres * x.plotPerUnit)).toBeLessThan(0.01);
        const n = Number(/scale 1:([\d,]+)/.exec(textOf(byRole(root, 'drawing-scale')[0]))![1].replace(/,/g, ''));
        expect(x.plotPerUnit).toBeCloseTo(1000 / n, 4);
        const vertical = byRole(root, 'vertical-scale-bar')[0];
        const y = axisMap(root, 'y-tick');
        const rects = Array.from(vertical.querySelectorAll('rect'));
        const height = rects.reduce((h, r) => h + Number(r.getAttribute('height')), 0);
        expect(Math.abs(height - Number(vertical.getAttribute('data-length-m')) * Math.abs(y.plotPerUnit))).toBeLessThan(0.01);
      }
    }
  });

  it('draws at the scale and exaggeration asked for, and says them, with the paper, in the title block', () => {
    const root = parseSvg(renderSectionSheets(LINE_10_SHOTS.survey, LINE_10_SHOTS.interpretation, { paper: 'A3', scale: 500, verticalExaggeration: 2 })[0]);
    expect(root.getAttribute('width')).toBe(`${PAPER_MM.A3[0]}mm`);
    expect(root.getAttribute('height')).toBe(`${PAPER_MM.A3[1]}mm`);
    expect(textOf(byRole(root, 'drawing-scale')[0])).toBe('scale 1:500 at A3 landscape · vertical 1:250');
    expect(textOf(byRole(root, 'vertical-exaggeration')[0])).toBe('vertical exaggeration 2:1');
    expect(axisMap(root, 'x-tick').plotPerUnit).toBeCloseTo(2, 4);
    expect(Math.abs(axisMap(root, 'y-tick').plotPerUnit)).toBeCloseTo(4, 4);
  });
});

describe('renderSectionSheets: the frame fits the section', () => {
  it('ends the plot just below the deepest line drawn (footroom only), not at the foot of the sheet: no sheet of empty lower layer', () => {
    for (const [fixture, options] of [[LINE_480, { paper: 'A3' as const, scale: 2500 }], [LINE_10_SHOTS, {}], [renderFixture(), {}]] as const) {
      const deepest = Math.min(
        ...fixture.interpretation.stations.flatMap((st) =>
          [st.refractorElevation, typeof st.hiddenLayerDepth === 'number' ? st.elevation - st.hiddenLayerDepth : null, ...(st.depths ?? []).map((d) => (typeof d === 'number' ? st.elevation - d : null))]
            .filter((v): v is number => typeof v === 'number')
            .map((v, _, all) => v - (typeof st.depthUncertainty === 'number' && v === all[0] ? st.depthUncertainty : 0)),
        ),
      );
      for (const svg of renderSectionSheets(fixture.survey, fixture.interpretation, options)) {
        const root = parseSvg(svg);
        const y = axisMap(root, 'y-tick');
        const frame = byRole(root, 'plot-frame')[0];
        const bottom = y.toData(Number(frame.getAttribute('y')) + Number(frame.getAttribute('height')));
        // Everything drawn lies inside the frame, and below it there is at most the footroom (9 mm) and a rounding.
        expect(bottom).toBeLessThanOrEqual(deepest + 1e-6);
        expect((deepest - bottom) * Math.abs(y.plotPerUnit)).toBeLessThan(9.5);
      }
    }
  });
});

describe('renderSectionSheets: long lines', () => {
  it('pages the 480-geophone line (2,395 m) at 1:2000 over the fewest sheets the paper allows, meeting at match lines printed on both sheets', () => {
    const spanM = 479 * 5;
    const counts: Record<string, number> = {};
    for (const paper of ['A4', 'A3'] as const) {
      const sheets = renderSectionSheets(LINE_480.survey, LINE_480.interpretation, { paper, scale: 2000 }).map(parseSvg);
      counts[paper] = sheets.length;
      // Plot width: the paper's drawing area less the margins, captions and elevation axis
      // (read from the first sheet's frame); at 1:2000 a metre is 0.5 mm.
      const frameWidth = Number(byRole(sheets[0], 'plot-frame')[0].getAttribute('width'));
      expect(frameWidth).toBeLessThanOrEqual(PAPER_MM[paper][0]);
      const fewest = Math.ceil((spanM * 0.5) / frameWidth);
      expect(sheets.length).toBeGreaterThanOrEqual(fewest);
      expect(sheets.length).toBeLessThanOrEqual(fewest + 1);
      // Every geophone drawn once, over all sheets; every sheet at the same scale.
      expect(sheets.reduce((n, root) => n + byRole(root, 'geophone').length, 0)).toBe(480);
      for (const root of sheets) expect(axisMap(root, 'x-tick').plotPerUnit).toBeCloseTo(0.5, 4);
      for (let k = 0; k + 1 < sheets.length; k++) {
        const right = byRole(sheets[k], 'match-label').find((el) => textOf(el).includes(`sheet ${k + 2}`))!;
        const left = byRole(sheets[k + 1], 'match-label').find((el) => textOf(el).includes(`sheet ${k + 1}`))!;
        expect(right.getAttribute('data-x')).toBe(left.getAttribute('data-x'));
        const chainage = Number(right.getAttribute('data-x'));
        expect(textOf(right)).toContain(`${chainage.toLocaleString('en-GB')} m`);
        expect(textOf(left)).toContain(`${chainage.toLocaleString('en-GB')} m`);
      }
      expect(textOf(byRole(sheets[0], 'subtitle')[0])).toContain(`sheet 1 of ${sheets.length}`);
    }
    expect(counts.A3).toBeLessThan(counts.A4);
  });

  it('renderSection returns the first sheet', () => {
    const sheets = renderSectionSheets(LINE_480.survey, LINE_480.interpretation);
    expect(renderSection(LINE_480.survey, LINE_480.interpretation)).toBe(sheets[0]);
  });

  it('renderSectionSheet draws sheet k alone, the same as among all the sheets, and sectionSheetCount plans without drawing', () => {
    const options = { paper: 'A3' as const, scale: 2000 };
    const sheets = renderSectionSheets(LINE_480.survey, LINE_480.interpretation, options);
    expect(sheets.length).toBeGreaterThan(1);
    expect(sectionSheetCount(LINE_480.survey, LINE_480.interpretation, options)).toBe(sheets.length);
    for (const k of [1, sheets.length]) {
      expect(renderSectionSheet(LINE_480.survey, LINE_480.interpretation, k, options)).toEqual({ svg: sheets[k - 1], sheetCount: sheets.length });
    }
    expect(renderSectionSheet(LINE_480.survey, LINE_480.interpretation, sheets.length + 1, options)).toEqual({ svg: null, sheetCount: sheets.length });
    expect(renderSectionSheet(LINE_480.survey, LINE_480.interpretation, 0, options).svg).toBeNull();
  });

  it(`refuses a scale that would need more than ${SHEET_LIMITS.maxSheets} sheets, naming the scale`, () => {
    try {
      renderSectionSheets(LINE_480.survey, LINE_480.interpretation, { scale: 100, paper: 'A3' });
      expect.unreachable('a 2.4 km line at 1:100 needs about 100 A4 sheets');
    } catch (error) {
      expect(error).toBeInstanceOf(SectionSheetError);
      const problem = (error as SectionSheetError).problems.find((p) => /sheets/.test(p.message));
      expect(problem?.field).toBe('scale');
    }
  });

  it(`"auto" never refuses a line: past ${SHEET_LIMITS.maxSheets} sheets it takes a smaller scale`, () => {
    // 300 geophones 0.5 m apart, then 100 at 500 m (an invented, awkward layout): the median
    // spacing asks for 1:250, at which 50 km would need about 850 A4 sheets.
    const { survey, interpretation } = renderFixture();
    const xs = [...Array.from({ length: 300 }, (_, i) => i * 0.5), ...Array.from({ length: 100 }, (_, i) => 150 + (i + 1) * 500)];
    const wide = { ...survey, geophones: xs.map((x) => ({ x, elevation: 40 })), shots: survey.shots.map((s) => ({ ...s, times: xs.map(() => null) })) };
    const sheets = renderSectionSheets(wide, { ...interpretation, stations: [] });
    expect(sheets.length).toBeGreaterThan(0);
    expect(sheets.length).toBeLessThanOrEqual(SHEET_LIMITS.maxSheets);
  });

  it('refuses an exaggeration the sheet cannot hold, naming it and the height needed', () => {
    try {
      renderSectionSheets(LINE_10_SHOTS.survey, LINE_10_SHOTS.interpretation, { scale: 200, verticalExaggeration: 50 });
      expect.unreachable('20 m of section at 1:4 vertically is 5 m of paper');
    } catch (error) {
      expect((error as SectionSheetError).problems[0].field).toBe('verticalExaggeration');
      expect((error as SectionSheetError).problems[0].message).toMatch(/mm of height/);
    }
  });
});

describe('renderSectionSheets: honest drawing', () => {
  it('draws stretches found from one side only dashed and interpolated ones dotted, never as solid', () => {
    const { survey, interpretation } = renderFixture();
    interpretation.stations.forEach((s, i) => {
      if (i < 4) s.coverage = 'phantom';
      if (i >= 10 && i < 13) s.delaySources = ['interpolated'];
    });
    const root = parseSvg(renderSection(survey, interpretation));
    const x = axisMap(root, 'x-tick');
    const xsOf = (role: string) => byRole(root, role).flatMap((l) => (l.getAttribute('points') ?? '').trim().split(/\s+/).map((p) => Math.round(x.toData(Number(p.split(',')[0])) * 100) / 100));
    expect(byRole(root, 'refractor-one-sided').every((l) => l.getAttribute('stroke-dasharray'))).toBe(true);
    expect(xsOf('refractor-one-sided')).toEqual([0, 2, 4, 6, 8]);
    expect(xsOf('refractor-interpolated')).toEqual([18, 20, 22, 24, 26]);
    for (const l of byRole(root, 'refractor')) expect(l.getAttribute('stroke-dasharray')).toBeNull();
    const solid = xsOf('refractor');
    for (const xm of [2, 4, 20, 22, 24]) expect(solid).not.toContain(xm);
    const depths = byRole(root, 'depth-row-label').map(textOf);
    expect(depths[0]).toMatch(/^\(\d+\.\d\)$/);
    expect(depths[11]).toMatch(/^~\d+\.\d$/);
    expect(textOf(root)).toContain('with phantomed arrivals, or one-way (intercept)');
    expect(textOf(root)).toContain('interpolated between stations');
  });

  it('draws the ±1σ band at refractor elevation ± depthUncertainty', () => {
    const { survey, interpretation } = renderFixture();
    interpretation.stations.forEach((s, i) => (s.depthUncertainty = 0.2 + 0.05 * (i % 3)));
    const root = parseSvg(renderSection(survey, interpretation));
    const y = axisMap(root, 'y-tick');
    const band = byRole(root, 'depth-uncertainty');
    expect(band).toHaveLength(1);
    const pts = (band[0].getAttribute('points') ?? '').trim().split(/\s+/).map((p) => Number(p.split(',')[1]));
    const n = interpretation.stations.length;
    interpretation.stations.forEach((s, i) => {
      expect(Math.abs(y.toData(pts[i]) - ((s.refractorElevation as number) + (s.depthUncertainty as number)))).toBeLessThan(0.01);
      expect(Math.abs(y.toData(pts[2 * n - 1 - i]) - ((s.refractorElevation as number) - (s.depthUncertainty as number)))).toBeLessThan(0.01);
    });
  });

  it('on a three-layer line puts each refractor\'s velocity in its own captioned row below the plot, none inside the plot', () => {
    const { survey, interpretation } = renderFixture({ secondRefractorBelowM: 8, refractorVelocity: [{ from: 0, to: 20, velocity: 2200 }, { from: 20, to: 46, velocity: 3900 }] });
    const root = parseSvg(renderSection(survey, interpretation));
    const frame = byRole(root, 'plot-frame')[0];
    const plotBottom = Number(frame.getAttribute('y')) + Number(frame.getAttribute('height'));
    const first = byRole(root, 'refractor-velocity')[0];
    const second = byRole(root, 'refractor-2-velocity')[0];
    expect(textOf(byRole(first, 'row-caption')[0])).toBe('V refractor 1');
    expect(textOf(byRole(second, 'row-caption')[0])).toBe('V refractor 2');
    expect(byRole(first, 'velocity-label').map(textOf)).toEqual(['2,200 m/s', '3,900 m/s']);
    expect(byRole(second, 'velocity-label').map(textOf)).toEqual(['4,200 m/s']);
    for (const el of [...byRole(first, 'velocity-label'), ...byRole(second, 'velocity-label')]) expect(Number(el.getAttribute('y'))).toBeGreaterThan(plotBottom);
  });

  it('without velocity segments, writes the refractor layer\'s mean velocity in the row, marked "(mean)"', () => {
    const { survey, interpretation } = renderFixture({ refractorVelocity: [] });
    interpretation.refractorVelocity = [];
    const row = byRole(parseSvg(renderSection(survey, interpretation)), 'refractor-velocity')[0];
    expect(textOf(byRole(row, 'row-caption')[0])).toBe('V refractor (mean)');
    const v = Math.round(interpretation.layers[1].velocity / 10) * 10;
    expect(byRole(row, 'velocity-label').map(textOf)).toEqual([`${v.toLocaleString('en-GB')} m/s`]);
  });

  it('summarises every warning in words in the title block, never as a bare count', () => {
    const { survey, interpretation } = renderFixture({ uncovered: [9, 10] });
    interpretation.qc.warnings.push({ code: 'hidden-layer', message: 'A hidden layer could be present.', x: 12 }, { code: 'some-new-check', message: 'Something new was found. More words follow.' });
    const root = parseSvg(renderSection(survey, interpretation));
    const summary = byRole(root, 'warning-summary').map(textOf).join(' ');
    expect(summary).toContain('no depth where no shot pair covers the line');
    expect(summary).toContain('hidden layer');
    expect(summary).toContain('Something new was found');
    expect(textOf(root)).not.toMatch(/\b\d+ warnings?\b/);
  });
});

describe('sectionSheetOptionProblems', () => {
  it('accepts the defaults, JSON values and query strings', () => {
    expect(sectionSheetOptionProblems(undefined)).toEqual([]);
    expect(sectionSheetOptionProblems({})).toEqual([]);
    expect(sectionSheetOptionProblems({ paper: 'A3', scale: 500, verticalExaggeration: 5, showArcs: false })).toEqual([]);
    expect(sectionSheetOptionProblems({ paper: 'a4', scale: '1:2500', verticalExaggeration: '2.5:1', showArcs: 'true' })).toEqual([]);
    expect(sectionSheetOptionProblems({ scale: 'auto', verticalExaggeration: 'auto' })).toEqual([]);
  });

  it('names each bad field and says why', () => {
    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ paper: 'A0' }, 'paper', /"A4" or "A3"/],
      [{ paper: 3 }, 'paper', /"A4" or "A3"/],
      [{ scale: 0 }, 'scale', /outside 1:1/],
      [{ scale: '1:abc' }, 'scale', /whole number/],
      [{ scale: 250.5 }, 'scale', /whole number/],
      [{ scale: 10_000_000 }, 'scale', /outside/],
      [{ verticalExaggeration: 0.5 }, 'verticalExaggeration', /squashed/],
      [{ verticalExaggeration: 'tall' }, 'verticalExaggeration', /number/],
      [{ verticalExaggeration: SHEET_LIMITS.maxVerticalExaggeration + 1 }, 'verticalExaggeration', /outside/],
      [{ showArcs: 'maybe' }, 'showArcs', /true or false/],
      [{ scal: 500 }, 'scal', /not an option/],
    ];
    for (const [raw, field, why] of cases) {
      const problems = sectionSheetOptionProblems(raw);
      expect(problems).toHaveLength(1);
      expect(problems[0].field).toBe(field);
      expect(problems[0].message).toMatch(why);
    }
    expect(sectionSheetOptionProblems({ paper: 'B5', scale: -1 }).map((p) => p.field)).toEqual(['paper', 'scale']);
    expect(sectionSheetOptionProblems('A3')[0].message).toMatch(/object/);
  });

  it('renderSectionSheets throws the same problems for bad options, drawing nothing', () => {
    const { survey, interpretation } = renderFixture();
    expect(() => renderSectionSheets(survey, interpretation, { paper: 'A5' as 'A4' })).toThrow(SectionSheetError);
  });
});
