import { describe, expect, it } from 'vitest';
import { renderSection, renderTravelTimes } from '../../../engine/render/index.js';
import { surveyDateText } from '../../../engine/render/describe.js';
import { readableSurveyDate } from '../../../server/share-page.js';
import { axisMap, byRole, parseSvg, renderFixture } from '../../helpers/render-fixture.js';
import { CAUTIONS } from '../../../engine/qc/cautions.js';
import { interpret } from '../../../engine/pipeline/interpret.js';
import { syntheticSurvey } from '../../../engine/forward/synthetic.js';
import type { LayeredModel } from '../../../engine/forward/model.js';

function points(el: Element): [number, number][] {
  return (el.getAttribute('points') ?? '')
    .trim()
    .split(/\s+/)
    .map((pair) => pair.split(',').map(Number) as [number, number]);
}

/** The words of an element: its <text> children joined by spaces (wrapped lines read back whole). */
function textOf(el: Element): string {
  const texts = el.nodeName.toLowerCase() === 'text' ? [el] : Array.from(el.querySelectorAll('text'));
  return texts.map((t) => t.textContent ?? '').join(' ').replace(/\s+/g, ' ').trim();
}

describe('renderSection', () => {
  it('returns a standalone A4-landscape SVG in millimetres with a viewBox', () => {
    const { survey, interpretation } = renderFixture();
    const svg = renderSection(survey, interpretation);
    const root = parseSvg(svg);
    expect(root.getAttribute('width')).toBe('277mm');
    expect(root.getAttribute('height')).toBe('190mm');
    expect(root.getAttribute('viewBox')).toBe('0 0 277 190');
    expect(svg).toContain('xmlns="http://www.w3.org/2000/svg"');
    expect(root.getAttribute('font-family')).toMatch(/sans-serif$/);
  });

  it('puts every refractor vertex at its station refractor elevation (scale inverted from the axis ticks, within 0.01 m)', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, interpretation));
    const x = axisMap(root, 'x-tick');
    const y = axisMap(root, 'y-tick');
    const lines = byRole(root, 'refractor');
    expect(lines).toHaveLength(1);
    const vertices = points(lines[0]);
    expect(vertices).toHaveLength(interpretation.stations.length);
    vertices.forEach(([px, py], i) => {
      const station = interpretation.stations[i];
      expect(Math.abs(x.toData(px) - station.x)).toBeLessThan(0.01);
      expect(Math.abs(y.toData(py) - (station.refractorElevation as number))).toBeLessThan(0.01);
    });
  });

  it('breaks the refractor at stations without a depth instead of drawing them at zero', () => {
    const { survey, interpretation } = renderFixture({ uncovered: [9, 10, 17] });
    const root = parseSvg(renderSection(survey, interpretation));
    const x = axisMap(root, 'x-tick');
    const y = axisMap(root, 'y-tick');
    const lines = byRole(root, 'refractor');
    // Runs: 0–8, 11–16, 18–23.
    expect(lines).toHaveLength(3);
    const drawnXs = lines.flatMap((l) => points(l).map(([px]) => Math.round(x.toData(px) * 100) / 100));
    for (const i of [9, 10, 17]) expect(drawnXs).not.toContain(interpretation.stations[i].x);
    for (const l of lines) {
      for (const [, py] of points(l)) expect(Math.abs(y.toData(py))).toBeGreaterThan(1); // nothing sits at elevation 0
    }
    expect(byRole(root, 'no-coverage')).toHaveLength(2);
    expect(textOf(root)).toContain('no coverage');
  });

  it('draws exactly one geophone marker per geophone, each carrying its x', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, interpretation));
    const markers = byRole(root, 'geophone');
    expect(markers).toHaveLength(survey.geophones.length);
    expect(markers.map((m) => Number(m.getAttribute('data-x')))).toEqual(survey.geophones.map((g) => g.x));
  });

  it('shows every shot once: a marker labelled with its id on the sheet, or its name and chainage at the sheet edge', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, interpretation));
    const shots = byRole(root, 'shot');
    const offSheet = byRole(root, 'shot-off-sheet');
    expect(shots.length + offSheet.length).toBe(survey.shots.length);
    expect([...shots, ...offSheet].map((s) => s.getAttribute('data-shot')).sort()).toEqual(survey.shots.map((s) => s.id).sort());
    for (const s of shots) expect(textOf(s)).toBe(s.getAttribute('data-shot'));
    const x = axisMap(root, 'x-tick');
    for (const s of offSheet) {
      const shot = survey.shots.find((one) => one.id === s.getAttribute('data-shot'))!;
      expect(textOf(s)).toContain(`${shot.x} m`);
      // Really off the sheet: beyond the plot's first or last chainage.
      const frame = byRole(root, 'plot-frame')[0];
      const left = x.toData(Number(frame.getAttribute('x')));
      const right = x.toData(Number(frame.getAttribute('x')) + Number(frame.getAttribute('width')));
      expect(shot.x < left || shot.x > right).toBe(true);
    }
  });

  it('escapes a hostile line name, date and shot id: they appear only as text, no <script> element exists', () => {
    const hostile = '<script>alert(1)</script>';
    const { survey, interpretation } = renderFixture({ name: hostile, date: '"><script>x()</script>', shotIds: ['W-off', `a"b<i>`, 'Mid', 'E-end', 'E-off'] });
    const svg = renderSection(survey, interpretation);
    expect(svg).not.toContain('<script');
    expect(svg).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    const root = parseSvg(svg);
    expect(root.querySelectorAll('script')).toHaveLength(0);
    expect(root.querySelectorAll('i')).toHaveLength(0);
    expect(textOf(byRole(root, 'title')[0])).toBe(hostile);
    expect(byRole(root, 'shot').map((s) => s.getAttribute('data-shot'))).toContain('a"b<i>');
  });

  it('carries every caution of the interpretation in full', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, interpretation));
    const cautions = byRole(root, 'caution').map(textOf);
    expect(cautions).toEqual(interpretation.cautions);
    expect(cautions).toEqual([...CAUTIONS]);
  });

  it('falls back to the standard cautions when an interpretation carries none', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, { ...interpretation, cautions: [] }));
    expect(byRole(root, 'caution').map(textOf)).toEqual([...CAUTIONS]);
  });

  it('marks each step at its x with its throw and the deeper side', () => {
    const { survey, interpretation } = renderFixture({ steps: [{ x: 31, throw: 2.8 }, { x: 9, throw: -1.25 }] });
    const root = parseSvg(renderSection(survey, interpretation));
    const x = axisMap(root, 'x-tick');
    const steps = byRole(root, 'step');
    expect(steps).toHaveLength(2);
    const byX = new Map(steps.map((s) => [Number(s.getAttribute('data-x')), s]));
    expect(textOf(byX.get(31)!)).toContain('step 2.8 m');
    expect(textOf(byX.get(31)!)).toContain('deeper to +x');
    expect(textOf(byX.get(9)!)).toContain('step 1.3 m');
    expect(textOf(byX.get(9)!)).toContain('deeper to −x');
    const bar = byX.get(31)!.querySelector('line')!;
    expect(Math.abs(x.toData(Number(bar.getAttribute('x1'))) - 31)).toBeLessThan(0.01);
  });

  it('states a vertical exaggeration that equals the ratio of the drawn scales, never below 1:1', () => {
    for (const options of [{}, { secondRefractorBelowM: 8 }, { secondRefractorBelowM: 30 }]) {
      const { survey, interpretation } = renderFixture(options);
      const root = parseSvg(renderSection(survey, interpretation));
      const ratio = Math.abs(axisMap(root, 'y-tick').plotPerUnit) / Math.abs(axisMap(root, 'x-tick').plotPerUnit);
      const text = textOf(byRole(root, 'vertical-exaggeration')[0]);
      const match = /^vertical exaggeration ([\d.]+):1$/.exec(text);
      expect(match).not.toBeNull();
      // Tick positions are written to 0.001 mm, so the recovered ratio carries that rounding.
      expect(Number(match![1])).toBeCloseTo(ratio, 3);
      expect(Number(match![1])).toBeGreaterThanOrEqual(1);
    }
  });

  it('uses tick steps of 1, 2 or 5 × 10^n on both axes', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderSection(survey, interpretation));
    for (const role of ['x-tick', 'y-tick']) {
      const values = byRole(root, role).map((t) => Number(t.getAttribute('data-value')));
      const step = values[1] - values[0];
      const mantissa = step / Math.pow(10, Math.floor(Math.log10(step) + 1e-9));
      expect([1, 2, 5].some((m) => Math.abs(mantissa - m) < 1e-9)).toBe(true);
    }
  });

  it('labels layer and refractor-segment velocities, marks velocity changes and notes the dip', () => {
    const { survey, interpretation } = renderFixture({
      refractorVelocity: [{ from: 0, to: 30, velocity: 2200 }, { from: 30, to: 46, velocity: 3900 }],
      velocityChanges: [{ x: 30, left: 2200, right: 3900 }],
    });
    const root = parseSvg(renderSection(survey, interpretation));
    const layerLabels = byRole(root, 'layer-label').map(textOf);
    expect(layerLabels).toContain('layer 1: 610 m/s');
    expect(layerLabels.some((l) => l.startsWith('layer 2: 2,450 m/s'))).toBe(true);
    const segments = byRole(root, 'velocity-segment');
    expect(segments.map(textOf)).toEqual(['2,200 m/s', '3,900 m/s']);
    // Each bar is broken where its label sits, so no line shows between the label's glyphs
    // (common drafting practice): no horizontal piece of the bar passes under the label's middle.
    for (const segment of segments) {
      const label = segment.querySelector('text')!;
      const cx = Number(label.getAttribute('x'));
      const pieces = Array.from(segment.querySelectorAll('line')).filter((l) => l.getAttribute('y1') === l.getAttribute('y2'));
      expect(pieces.length).toBe(2);
      for (const piece of pieces) {
        const [a, b] = [Number(piece.getAttribute('x1')), Number(piece.getAttribute('x2'))].sort((p, q) => p - q);
        expect(a > cx || b < cx, textOf(segment)).toBe(true);
      }
    }
    expect(byRole(root, 'velocity-change')).toHaveLength(1);
    expect(textOf(byRole(root, 'velocity-change')[0])).toBe('2,200 m/s → 3,900 m/s');
    expect(textOf(byRole(root, 'dip')[0])).toBe('refractor dip 4.2°, deepening to +x');
  });

  it('on a three-layer line names each refractor in its dip line', () => {
    const { survey, interpretation } = renderFixture({ secondRefractorBelowM: 8 });
    const withLower = {
      ...interpretation,
      features: { ...interpretation.features, lowerRefractor: { dip: { degrees: 11.93, source: 'refractor-elevations' as const, rmsM: 0.02 }, localDips: [] } },
    };
    const root = parseSvg(renderSection(survey, withLower));
    expect(textOf(byRole(root, 'dip')[0])).toBe('first refractor dip 4.2°, deepening to +x');
    expect(textOf(byRole(root, 'dip-2')[0])).toBe('second refractor dip 11.9°, deepening to +x');
    const unplanar = { ...withLower, features: { ...withLower.features, lowerRefractor: { dip: null, localDips: [] } } };
    expect(textOf(byRole(parseSvg(renderSection(survey, unplanar)), 'dip-2')[0])).toBe('second refractor: no single planar dip');
  });

  it('marks a step in the rock on the second refractor, at its x, as a rock step with its throw', () => {
    const { survey, interpretation } = renderFixture({ secondRefractorBelowM: 8 });
    const rockStep = { x: 27, throw: 4.6, delayJumpMs: 2.4, seenIn: ['rock-delay-time'], statistic: 50.6, threshold: 42.1 };
    const withRockStep = {
      ...interpretation,
      features: { ...interpretation.features, lowerRefractor: { dip: null, localDips: [], steps: [rockStep] } },
    };
    const root = parseSvg(renderSection(survey, withRockStep));
    const x = axisMap(root, 'x-tick');
    const y = axisMap(root, 'y-tick');
    const marks = byRole(root, 'rock-step');
    expect(marks).toHaveLength(1);
    expect(textOf(marks[0])).toContain('rock step 4.6 m');
    expect(textOf(marks[0])).toContain('deeper to +x');
    const bar = marks[0].querySelector('line')!;
    expect(Math.abs(x.toData(Number(bar.getAttribute('x1'))) - 27)).toBeLessThan(0.01);
    // The tick is centred on the second refractor (elevation − depths[1]), not the first: its
    // ends are 4 mm either side of it.
    const station = interpretation.stations.reduce((a, b) => (Math.abs(b.x - 27) < Math.abs(a.x - 27) ? b : a));
    const mid = (Number(bar.getAttribute('y1')) + Number(bar.getAttribute('y2'))) / 2;
    const rockElevation = station.elevation - (station.depths[1] as number);
    expect(Math.abs(y.toData(mid) - rockElevation)).toBeLessThan(1);
    expect(byRole(parseSvg(renderSection(survey, interpretation)), 'rock-step')).toHaveLength(0);
  });

  it('says "no single planar dip" when the interpretation has none', () => {
    const { survey, interpretation } = renderFixture({ noDip: true });
    const root = parseSvg(renderSection(survey, interpretation));
    expect(textOf(byRole(root, 'dip')[0])).toBe('no single planar dip');
  });

  it('draws a second refractor from depths[1] at elevation − depth', () => {
    const { survey, interpretation } = renderFixture({ secondRefractorBelowM: 8 });
    const root = parseSvg(renderSection(survey, interpretation));
    const y = axisMap(root, 'y-tick');
    const lines = byRole(root, 'refractor-2');
    expect(lines).toHaveLength(1);
    points(lines[0]).forEach(([, py], i) => {
      const s = interpretation.stations[i];
      expect(Math.abs(y.toData(py) - (s.elevation - (s.depths[1] as number)))).toBeLessThan(0.01);
    });
    expect(byRole(root, 'layer-label').map(textOf)).toContain('layer 3: 4,200 m/s');
  });

  it('draws the hidden-layer limit at elevation − hiddenLayerDepth, with its legend entry, only where the interpretation gives one', () => {
    const { survey, interpretation } = renderFixture();
    const plain = parseSvg(renderSection(survey, interpretation));
    expect(byRole(plain, 'hidden-layer-limit')).toHaveLength(0);
    const withLimit = { ...interpretation, stations: interpretation.stations.map((s) => ({ ...s, hiddenLayerDepth: typeof s.depth === 'number' ? s.depth + 3 : null })) };
    const root = parseSvg(renderSection(survey, withLimit));
    const y = axisMap(root, 'y-tick');
    const lines = byRole(root, 'hidden-layer-limit');
    expect(lines).toHaveLength(1);
    points(lines[0]).forEach(([, py], i) => {
      const s = withLimit.stations[i];
      expect(Math.abs(y.toData(py) - (s.elevation - (s.hiddenLayerDepth as number)))).toBeLessThan(0.01);
    });
    expect(textOf(root)).toContain('deepest refractor if a hidden layer is present');
  });

  it('draws one depth arc per station with a normal depth, and none when asked not to', () => {
    const { survey, interpretation } = renderFixture({ uncovered: [4] });
    const withArcs = parseSvg(renderSection(survey, interpretation));
    expect(byRole(withArcs, 'depth-arc')).toHaveLength(interpretation.stations.length - 1);
    const without = parseSvg(renderSection(survey, interpretation, { showArcs: false }));
    expect(byRole(without, 'depth-arc')).toHaveLength(0);
  });

  it('shows the title block: name, date, method, counts', () => {
    const { survey, interpretation } = renderFixture({ date: '14 March 2025, crew B' });
    const root = parseSvg(renderSection(survey, interpretation));
    expect(textOf(byRole(root, 'title')[0])).toBe(survey.name);
    expect(textOf(byRole(root, 'date')[0])).toBe('14 March 2025, crew B');
    expect(textOf(byRole(root, 'subtitle')[0])).toBe('Depth section · plus-minus method · 24 geophones · 5 shots');
  });

  it('writes a bare ISO date in words on both drawings, as the share page does, and leaves other text as it is', () => {
    const { survey, interpretation } = renderFixture({ date: '2026-11-20' });
    for (const svg of [renderSection(survey, interpretation), renderTravelTimes(survey, interpretation)]) {
      expect(textOf(byRole(parseSvg(svg), 'date')[0])).toBe('shot on 20 November 2026');
    }
    expect(readableSurveyDate('2026-11-20')).toBe('shot on 20 November 2026');
    // Calendar checks (Gregorian leap years): 2024 is one, 1900 is not, 2000 is.
    expect(surveyDateText('2024-02-29')).toBe('shot on 29 February 2024');
    expect(surveyDateText('1900-02-29')).toBe('1900-02-29');
    expect(surveyDateText('2000-02-29')).toBe('shot on 29 February 2000');
    expect(surveyDateText('2026-13-01')).toBe('2026-13-01');
    expect(surveyDateText('20 Nov 2026, crew B')).toBe('20 Nov 2026, crew B');
  });

  it('flags a failed reciprocal check in the title block', () => {
    const { survey, interpretation } = renderFixture({ reciprocalErrorMs: 4.1 });
    const root = parseSvg(renderSection(survey, interpretation));
    const alert = byRole(root, 'reciprocal-alert');
    expect(alert).toHaveLength(1);
    expect(textOf(alert[0])).toContain('W-end/E-end');
  });

  it('is deterministic: two renders of the same input are identical, whatever was drawn between them', () => {
    const a = renderFixture({ uncovered: [3], steps: [{ x: 20, throw: 1 }] });
    const first = renderSection(a.survey, a.interpretation);
    const other = renderFixture({ secondRefractorBelowM: 5 });
    renderSection(other.survey, other.interpretation);
    expect(renderSection(a.survey, a.interpretation)).toBe(first);
  });

  it('does not change the interpretation or survey it draws', () => {
    const { survey, interpretation } = renderFixture({ steps: [{ x: 20, throw: 1 }] });
    const before = JSON.stringify({ survey, interpretation });
    renderSection(survey, interpretation);
    expect(JSON.stringify({ survey, interpretation })).toBe(before);
  });

  it('still draws a section when no station has coverage', () => {
    const { survey, interpretation } = renderFixture({ uncovered: Array.from({ length: 24 }, (_, i) => i) });
    const root = parseSvg(renderSection(survey, interpretation));
    expect(byRole(root, 'refractor')).toHaveLength(0);
    expect(byRole(root, 'no-coverage')).toHaveLength(1);
    expect(byRole(root, 'geophone')).toHaveLength(24);
  });
});

describe('renderSection: the title block says how many layers and why (issue 10)', () => {
  // Invented three-layer eikonal line (500/2000/4000 m/s, 5 and 14 m, 32 × 3 m, off-end 40 m) with
  // 0.3 ms pick noise (seed 1): the first reading misfits the picks, so the layer count is then
  // chosen by BIC (qc.layerChoice).
  const model: LayeredModel = {
    surface: [{ x: -500, elevation: 0 }, { x: 500, elevation: 0 }],
    layers: [
      { velocity: 500 },
      { velocity: 2000, top: [{ x: -500, elevation: -5 }, { x: 500, elevation: -5 }] },
      { velocity: 4000, top: [{ x: -500, elevation: -14 }, { x: 500, elevation: -14 }] },
    ],
  };
  const survey = syntheticSurvey(model, { geophoneCount: 32, firstX: 0, spacing: 3, shots: [{ x: -40 }, { x: -1.5 }, { x: 46.5 }, { x: 94.5 }, { x: 133 }] }, { noiseMs: 0.3, seed: 1 });

  it('with qc.layerChoice: the count taken, the criterion, and every candidate\'s BIC and RMS as reported', () => {
    const interpretation = interpret(survey);
    const choice = interpretation.qc.layerChoice!;
    expect(choice).toBeDefined();
    const root = parseSvg(renderSection(survey, interpretation));
    const taken = choice.candidates.find((c) => c.label === choice.chosen)!;
    expect(textOf(byRole(root, 'layer-count')[0])).toBe(`${taken.layers} layers taken (${taken.label}): lowest BIC`);
    const lines = byRole(root, 'layer-count-candidate').map(textOf);
    expect(lines).toEqual(choice.candidates.map((c) => `${c.label} · ${c.layers} layers · RMS ${c.rmsMs.toFixed(2)} ms · BIC ${c.bic.toFixed(1)}`));
  });

  it('without a choice: asked for (options.layers), or read from the picks\' branches', () => {
    const forced = { ...survey, options: { layers: 3 as const, residuals: false } };
    const asked = parseSvg(renderSection(forced, interpret(forced)));
    expect(textOf(byRole(asked, 'layer-count')[0])).toBe('3 layers, as asked (options.layers)');
    expect(byRole(asked, 'layer-count-candidate')).toHaveLength(0);
    const { survey: twoLayer, interpretation } = renderFixture();
    const own = parseSvg(renderSection(twoLayer, interpretation));
    expect(textOf(byRole(own, 'layer-count')[0])).toBe(`${interpretation.layers.length} layers, from the picks' branches`);
  });
});
