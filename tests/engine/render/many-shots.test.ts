/**
 * The time–distance plot of lines with many shots (issue 11, item 4): every shot told apart
 * by colour and marker shape together, the legend showing both, and no two text labels
 * overprinting each other. Lines: closed-form two-layer times interpreted by the engine
 * (tests/helpers/many-shot-lines.ts).
 *
 * Text boxes are estimated from the SVG's own attributes: 0.56 em a character (generous for
 * Helvetica/Arial, from memory), ascent 0.85 em and descent 0.25 em (common practice for
 * sans-serif faces), turned with the text's rotation. tests/e2e/traveltimes-many-shots.test.ts
 * checks the same with the boxes Chromium lays out.
 */
import { describe, expect, it } from 'vitest';
import { interpret } from '../../../engine/pipeline/interpret.js';
import { renderTravelTimes, DISTINCT_SHOT_STYLES } from '../../../engine/render/travel-times.js';
import { SURVEY_LIMITS, type Survey } from '../../../engine/index.js';
import { axisMap, byRole, parseSvg } from '../../helpers/render-fixture.js';
import { fortyShotLine, tenShotLine } from '../../helpers/many-shot-lines.js';

interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

/** Axis-aligned box of a text element on the page, mm (see the file comment). */
function textBox(el: Element): Box {
  const x = Number(el.getAttribute('x'));
  const y = Number(el.getAttribute('y'));
  const size = Number(el.getAttribute('font-size'));
  const w = (el.textContent ?? '').length * size * 0.56;
  const anchor = el.getAttribute('text-anchor') ?? 'start';
  const u0 = anchor === 'middle' ? -w / 2 : anchor === 'end' ? -w : 0;
  const corners = [
    [u0, -0.85 * size],
    [u0 + w, -0.85 * size],
    [u0, 0.25 * size],
    [u0 + w, 0.25 * size],
  ];
  const m = /rotate\(([-\d.e]+)/.exec(el.getAttribute('transform') ?? '');
  const a = m ? (Number(m[1]) * Math.PI) / 180 : 0;
  const xs = corners.map(([u, v]) => x + u * Math.cos(a) - v * Math.sin(a));
  const ys = corners.map(([u, v]) => y + u * Math.sin(a) + v * Math.cos(a));
  return { x0: Math.min(...xs), y0: Math.min(...ys), x1: Math.max(...xs), y1: Math.max(...ys) };
}

/** Pairs of labels whose boxes overlap by more than 0.05 mm each way (the estimate's slack). */
function overlappingLabels(labels: Element[]): string[] {
  const boxes = labels.map(textBox);
  const out: string[] = [];
  const slack = 0.05;
  for (let i = 0; i < boxes.length; i++) {
    for (let j = i + 1; j < boxes.length; j++) {
      const w = Math.min(boxes[i].x1, boxes[j].x1) - Math.max(boxes[i].x0, boxes[j].x0);
      const h = Math.min(boxes[i].y1, boxes[j].y1) - Math.max(boxes[i].y0, boxes[j].y0);
      if (w > slack && h > slack) out.push(`"${labels[i].textContent}" / "${labels[j].textContent}"`);
    }
  }
  return out;
}

/** Labels drawn in and around the plot (title block, legend and cautions lay out their own rows). */
const PLOT_LABEL_ROLES = ['branch-label', 'reciprocal-label', 'label-note', 'x-tick-label', 'y-tick-label', 'x-axis', 'y-axis', 'x-title', 'y-title'];

function plotLabels(root: Element): Element[] {
  return Array.from(root.querySelectorAll('text')).filter((t) => {
    const role = t.getAttribute('data-role') ?? (t.parentNode as Element | null)?.getAttribute?.('data-role') ?? '';
    return PLOT_LABEL_ROLES.some((r) => role.startsWith(r));
  });
}

function render(survey: Survey): { root: Element; survey: Survey; interpretation: ReturnType<typeof interpret> } {
  const interpretation = interpret(survey);
  return { root: parseSvg(renderTravelTimes(survey, interpretation)), survey, interpretation };
}

/** Each shot's pick colour and shape, read from the drawing. */
function pickStyles(root: Element, survey: Survey): Map<string, { colour: string; shape: string }> {
  const styles = new Map<string, { colour: string; shape: string }>();
  for (const shot of survey.shots) {
    const picks = byRole(root, 'pick').filter((p) => p.getAttribute('data-shot') === shot.id);
    expect(picks.length).toBeGreaterThan(0);
    const seen = new Set(picks.map((p) => `${p.getAttribute('stroke')}|${p.getAttribute('data-shape')}`));
    expect(seen.size).toBe(1); // one style per shot
    const [colour, shape] = [...seen][0].split('|');
    styles.set(shot.id, { colour, shape });
  }
  return styles;
}

const lines = [
  { name: '10 shots', make: tenShotLine },
  { name: '40 shots', make: fortyShotLine },
];

describe('time–distance plot with many shots', () => {
  it('has more distinct colour-and-shape pairs than a survey may have shots', () => {
    expect(DISTINCT_SHOT_STYLES).toBeGreaterThanOrEqual(SURVEY_LIMITS.maxShots);
  });

  for (const { name, make } of lines) {
    describe(name, () => {
      const { root, survey, interpretation } = render(make());
      const styles = pickStyles(root, survey);

      it('gives no two shots the same colour and shape, and neighbours along the line differ in both', () => {
        const pairs = [...styles.values()].map((s) => `${s.colour}|${s.shape}`);
        expect(new Set(pairs).size).toBe(survey.shots.length);
        const byX = [...survey.shots].sort((a, b) => a.x - b.x);
        for (let k = 1; k < byX.length; k++) {
          const a = styles.get(byX[k - 1].id)!;
          const b = styles.get(byX[k].id)!;
          expect(a.colour).not.toBe(b.colour);
          expect(a.shape).not.toBe(b.shape);
        }
      });

      it('shows each shot in the legend with its own colour and shape, in order along the line', () => {
        const keys = byRole(root, 'legend-shot');
        expect(keys.map((k) => k.getAttribute('data-shot'))).toEqual([...survey.shots].sort((a, b) => a.x - b.x).map((s) => s.id));
        for (const key of keys) {
          const style = styles.get(key.getAttribute('data-shot')!)!;
          expect(key.getAttribute('stroke')).toBe(style.colour);
          expect(key.getAttribute('data-shape')).toBe(style.shape);
        }
      });

      it('lets no two text labels overprint each other', () => {
        const labels = plotLabels(root);
        // Tick labels are among them.
        expect(labels.filter((l) => l.getAttribute('data-role') === 'x-tick-label').length).toBeGreaterThan(5);
        expect(byRole(root, 'reciprocal-label').length).toBeGreaterThan(10);
        expect(byRole(root, 'branch-label').length).toBeGreaterThan(10);
        expect(overlappingLabels(labels)).toEqual([]);
      });

      it('says how many labels were left out, matching what is drawn', () => {
        const written = byRole(root, 'reciprocal-label').length;
        const checks = interpretation.qc.reciprocal.length;
        const note = byRole(root, 'label-note')[0]?.textContent ?? '';
        if (written < checks) expect(note).toContain(`Δ on ${written} of ${checks} pairs`);
        else expect(note).not.toContain('Δ on');
        // Every drawn pair has its label; a passing pair without one is not bracketed.
        expect(byRole(root, 'reciprocal')).toHaveLength(written);
      });
    });
  }

  it('always draws and labels a failed reciprocal check, even on a crowded 40-shot line', () => {
    const survey = fortyShotLine();
    const late = survey.shots.find((s) => s.id === 'S20')!;
    late.times = late.times.map((t) => (t === null ? null : t + 6)); // a 6 ms trigger error
    const { root, interpretation } = render(survey);
    const failed = interpretation.qc.reciprocal.filter((c) => !c.ok);
    expect(failed.length).toBeGreaterThan(0);
    expect(byRole(root, 'reciprocal').filter((g) => g.getAttribute('data-ok') === 'false')).toHaveLength(failed.length);
    const failedLabels = byRole(root, 'reciprocal-label').filter((l) => l.getAttribute('data-ok') === 'false');
    // Failed labels are placed first; on this line every one finds room.
    expect(failedLabels).toHaveLength(failed.length);
    expect(overlappingLabels(plotLabels(root))).toEqual([]);
  });
});

describe('time–distance plot of a long line (240 geophones at 5 m, 12 shots)', () => {
  it("draws every pick, but a shot's full markers no closer than 3.4 mm on paper, the picks between as dots of the same colour and shape", async () => {
    const { longLine } = await import('../../helpers/long-lines.js');
    const survey = longLine({ geophones: 240, spacingM: 5, shots: 12 });
    const { root } = render(survey);
    const picks = byRole(root, 'pick');
    expect(picks).toHaveLength(survey.shots.reduce((n, s) => n + s.times.filter((t) => t !== null).length, 0));
    const x = axisMap(root, 'x-tick');
    for (const shot of survey.shots) {
      const own = picks.filter((p) => p.getAttribute('data-shot') === shot.id);
      expect(new Set(own.map((p) => `${p.getAttribute('stroke')}|${p.getAttribute('data-shape')}`)).size).toBe(1);
      const full = own.filter((p) => p.getAttribute('data-mark') === 'marker');
      expect(own.filter((p) => p.getAttribute('data-mark') === 'dot').length).toBe(own.length - full.length);
      expect(full.length).toBeGreaterThan(5);
      expect(full.length).toBeLessThan(own.length / 2);
      const xs = full.map((p) => Number(p.getAttribute('data-x'))).sort((a, b) => a - b);
      const minGapMm = Math.min(...xs.slice(1).map((v, i) => (v - xs[i]) * x.plotPerUnit));
      expect(minGapMm).toBeGreaterThanOrEqual(3.4 - 1e-6);
    }
    // The legend says how the picks are drawn.
    expect(byRole(root, 'legend').map((g) => g.textContent ?? '').join(' ')).toMatch(/marker at every \d+(st|nd|rd|th), dots between/);
  });

  it('keeps a full marker at every pick where geophones are not crowded (Demo A, 3 m spacing: about 9 mm on paper)', async () => {
    const { demoLine } = await import('../../../engine/samples/demo-lines.js');
    const { root } = render(demoLine());
    const marks = byRole(root, 'pick').map((p) => p.getAttribute('data-mark'));
    expect(marks.length).toBeGreaterThan(100);
    expect(marks.filter((m) => m !== 'marker')).toEqual([]);
  });
});
