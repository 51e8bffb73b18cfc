import { describe, expect, it } from 'vitest';
import { renderTravelTimes } from '../../../engine/render/index.js';
import { axisMap, byRole, parseSvg, renderFixture } from '../../helpers/render-fixture.js';

function textOf(el: Element): string {
  const texts = el.nodeName.toLowerCase() === 'text' ? [el] : Array.from(el.querySelectorAll('text'));
  return texts.map((t) => t.textContent ?? '').join(' ').replace(/\s+/g, ' ').trim();
}

describe('renderTravelTimes', () => {
  it('says every warning in words under the title, never as a bare count, and without the section\'s drawing hints (issue 11 item 1)', () => {
    const { survey, interpretation } = renderFixture();
    const warned = {
      ...interpretation,
      qc: {
        ...interpretation.qc,
        warnings: [
          { code: 'hidden-layer', message: 'A layer of up to 2.0 m could be hidden above the refractor.' },
          { code: 'no-coverage', message: 'No delay time or depth at x = 0.0–4.0 m.', x: 0 },
        ],
      },
    };
    const root = parseSvg(renderTravelTimes(survey, warned));
    const block = textOf(byRole(root, 'title-block')[0]);
    expect(block).toContain('Warnings: a hidden layer could lie above the refractor; no depth where no shot pair covers the line at 0 m.');
    expect(block).not.toMatch(/\d+ warnings?\b/);
    // The plot draws no refractor: the section's "drawn dash-dot" and "hatched" do not belong here.
    expect(block).not.toMatch(/dash-dot|hatched/);
  });

  it('draws one marker per non-null pick, per shot', () => {
    const { survey, interpretation } = renderFixture({ deadPicks: [[0, 3], [2, 11], [2, 12], [4, 23]] });
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const picks = byRole(root, 'pick');
    const expected = survey.shots.reduce((n, s) => n + s.times.filter((t) => t !== null).length, 0);
    expect(picks).toHaveLength(expected);
    expect(expected).toBe(24 * 5 - 4);
    for (const shot of survey.shots) {
      expect(picks.filter((p) => p.getAttribute('data-shot') === shot.id)).toHaveLength(shot.times.filter((t) => t !== null).length);
    }
  });

  it('plots picks with time increasing upward, at their x and time', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const toX = axisMap(root, 'x-tick').toData;
    const toT = axisMap(root, 'y-tick').toData;
    const ticks = byRole(root, 'y-tick');
    // Larger times sit higher on the page (smaller y).
    expect(Number(ticks[ticks.length - 1].getAttribute('y1'))).toBeLessThan(Number(ticks[0].getAttribute('y1')));
    const circles = byRole(root, 'pick').filter((p) => p.nodeName.toLowerCase() === 'circle');
    expect(circles.length).toBeGreaterThan(0);
    for (const c of circles) {
      expect(Math.abs(toX(Number(c.getAttribute('cx'))) - Number(c.getAttribute('data-x')))).toBeLessThan(0.01);
      expect(Math.abs(toT(Number(c.getAttribute('cy'))) - Number(c.getAttribute('data-time')))).toBeLessThan(0.01);
    }
  });

  it('draws one line per fitted branch, over its extent, with its apparent velocity written', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const toX = axisMap(root, 'x-tick').toData;
    const toT = axisMap(root, 'y-tick').toData;
    const branches = byRole(root, 'branch');
    let expected = 0;
    for (const a of interpretation.shots) {
      for (const side of [a.left, a.right]) {
        if (!side) continue;
        const lines = [side.direct, ...side.refracted].filter((l) => l !== null);
        expected += lines.length;
        for (const line of lines) {
          const drawn = branches.find(
            (b) => b.getAttribute('data-shot') === a.id && b.getAttribute('data-side') === side.side && Number(b.getAttribute('data-velocity')) === line!.velocity,
          );
          expect(drawn).toBeDefined();
          const x1 = toX(Number(drawn!.getAttribute('x1')));
          const x2 = toX(Number(drawn!.getAttribute('x2')));
          expect(Math.abs(x1 - Math.min(line!.fromX, line!.toX))).toBeLessThan(0.01);
          expect(Math.abs(x2 - Math.max(line!.fromX, line!.toX))).toBeLessThan(0.01);
          // The drawn end time is the branch's own t = intercept + 1000·|x − shot x| / V.
          const t1 = toT(Number(drawn!.getAttribute('y1')));
          expect(Math.abs(t1 - (line!.interceptMs + (1000 * Math.abs(x1 - a.x)) / line!.velocity!))).toBeLessThan(0.01);
        }
      }
    }
    expect(branches).toHaveLength(expected);
    const labels = byRole(root, 'branch-label').map(textOf);
    expect(labels).toHaveLength(expected);
    expect(labels).toContain('610 m/s');
    for (const l of labels) expect(l).toMatch(/^\d{1,3}(,\d{3})* m\/s$/);
  });

  it('writes the misfit of each reciprocal pair and brackets both shot positions', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const groups = byRole(root, 'reciprocal');
    expect(groups).toHaveLength(interpretation.qc.reciprocal.length);
    for (const g of groups) expect(g.querySelectorAll('[data-role="reciprocal-bracket"]')).toHaveLength(2);
    const labels = byRole(root, 'reciprocal-label').map(textOf);
    for (const check of interpretation.qc.reciprocal) {
      const expected = `Δ ${Math.abs(check.differenceMs).toFixed(1)} ms ${check.shots[0]}/${check.shots[1]}`;
      expect(labels).toContain(expected);
    }
  });

  it('highlights a reciprocal pair that fails its tolerance', () => {
    const { survey, interpretation } = renderFixture({ reciprocalErrorMs: 4.1 });
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const failed = byRole(root, 'reciprocal-label').filter((l) => l.getAttribute('data-ok') === 'false');
    expect(failed).toHaveLength(1);
    expect(textOf(failed[0])).toContain('exceeds 3.0 ms');
    expect(failed[0].getAttribute('font-weight')).toBe('bold');
    const ok = byRole(root, 'reciprocal-label').filter((l) => l.getAttribute('data-ok') === 'true');
    expect(ok.every((l) => l.getAttribute('font-weight') !== 'bold')).toBe(true);
  });

  it('draws phantomed arrivals as hollow markers, one per phantomed time', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    const expected = interpretation.shots.reduce((n, a) => n + (a.phantom ? a.phantom.times.filter((t) => t !== null).length : 0), 0);
    expect(expected).toBeGreaterThan(0);
    const phantoms = byRole(root, 'phantom');
    expect(phantoms).toHaveLength(expected);
    // Hollow: white inside, or for the stroke shapes (plus, cross) a thin stroke where a pick's is bold.
    for (const p of phantoms) {
      const hollow = p.getAttribute('fill') === '#ffffff' || (p.getAttribute('fill') === 'none' && Number(p.getAttribute('stroke-width')) < 0.3);
      expect(hollow).toBe(true);
    }
    expect(byRole(root, 'phantom-line').every((l) => (l.getAttribute('stroke-dasharray') ?? '').length > 0)).toBe(true);
  });

  it('draws modelled first arrivals as thin lines when present, and marks crossovers', () => {
    const { survey, interpretation } = renderFixture();
    const root = parseSvg(renderTravelTimes(survey, interpretation));
    expect(byRole(root, 'modelled')).toHaveLength(interpretation.shots.length);
    const crossovers = interpretation.shots.reduce((n, a) => n + [a.left, a.right].filter((s) => s && s.crossoverDistance !== null).length, 0);
    expect(byRole(root, 'crossover')).toHaveLength(crossovers);
    const without = parseSvg(renderTravelTimes(survey, { ...interpretation, shots: interpretation.shots.map((a) => ({ ...a, modelledMs: undefined })) }));
    expect(byRole(without, 'modelled')).toHaveLength(0);
  });

  it('names every shot in the legend, escaped', () => {
    const { survey, interpretation } = renderFixture({ shotIds: ['W-off', '<script>x</script>', 'Mid', 'E-end', 'E-off'], name: '<script>alert(1)</script>' });
    const svg = renderTravelTimes(survey, interpretation);
    expect(svg).not.toContain('<script');
    const root = parseSvg(svg);
    expect(root.querySelectorAll('script')).toHaveLength(0);
    const legendText = byRole(root, 'legend-item').map(textOf);
    for (const shot of survey.shots) expect(legendText).toContain(shot.id);
  });

  it('carries the cautions, and is deterministic', () => {
    const { survey, interpretation } = renderFixture();
    const first = renderTravelTimes(survey, interpretation);
    const root = parseSvg(first);
    expect(byRole(root, 'caution').map(textOf)).toEqual(interpretation.cautions);
    expect(renderTravelTimes(survey, interpretation)).toBe(first);
  });
});
