// The GRM functions page (engine/render/grm-functions.ts): one line per XY the
// interpretation reports (Palmer 1980's functions), the optimum drawn once and heavy,
// labels that never overprint, the same bytes for the same input.
import { describe, expect, it } from 'vitest';
import { interpret } from '../../../engine/pipeline/interpret.js';
import { renderGrmFunctions } from '../../../engine/render/grm-functions.js';
import { fiveShotLayout, planarSurvey } from '../../helpers/planar-survey.js';

const survey = planarSurvey({ v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 5 }, fiveShotLayout());
const grmLine = interpret({ ...survey, options: { residuals: false, method: 'grm' } });

describe('GRM functions page', () => {
  const svg = renderGrmFunctions(survey, grmLine);
  const count = (re: RegExp) => (svg.match(re) ?? []).length;
  it('draws each XY in both panels, the optimum once per panel', () => {
    const n = grmLine.grm!.xyFunctions.length;
    expect(count(/data-role="xy-optimum"/g)).toBe(2);
    expect(count(/data-role="xy-line"/g)).toBe(2 * (n - 1));
  });
  it('keeps XY labels at least one text height apart in each panel', () => {
    for (const role of ['velocity-analysis', 'time-depth']) {
      const group = svg.split(`data-role="${role}"`)[1].split('</g>')[0];
      const ys = [...group.matchAll(/<text[^>]*\sy="([\d.]+)"[^>]*data-role="xy-label"/g)].map((m) => Number(m[1])).sort((a, b) => a - b);
      expect(ys.length).toBeGreaterThanOrEqual(1);
      for (let i = 1; i < ys.length; i++) expect(ys[i] - ys[i - 1]).toBeGreaterThanOrEqual(2.8 * 0.95 - 1e-9);
    }
  });
  it('is the same document for the same input', () => {
    expect(renderGrmFunctions(survey, grmLine)).toBe(svg);
  });
  it('says there are none on a plus-minus line', () => {
    const pm = interpret({ ...survey, options: { residuals: false } });
    expect(renderGrmFunctions(survey, pm)).toContain('data-role="grm-none"');
  });
});
