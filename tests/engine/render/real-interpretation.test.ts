import { describe, expect, it } from 'vitest';
import { renderSection, renderTravelTimes } from '../../../engine/render/index.js';
import { interpret } from '../../../engine/pipeline/interpret.js';
import { demoLine, flatLine } from '../../../engine/samples/demo-lines.js';
import { axisMap, byRole, parseSvg } from '../../helpers/render-fixture.js';

describe('rendering the engine’s own interpretation of the demo lines', () => {
  for (const [label, make] of [['demo A (dipping)', demoLine], ['demo B (flat)', flatLine]] as const) {
    it(`${label}: section vertices sit at the interpreted refractor elevations; one marker per geophone and shot`, () => {
      const survey = make();
      const interpretation = interpret(survey);
      const root = parseSvg(renderSection(survey, interpretation));
      const toX = axisMap(root, 'x-tick').toData;
      const toZ = axisMap(root, 'y-tick').toData;
      const byX = new Map(interpretation.stations.map((s) => [s.x, s.refractorElevation]));
      // Stretches are drawn solid, dashed (one side only) or dotted (interpolated); neighbouring
      // stretches share their end vertex, so vertices are counted once per station.
      const lines = ['refractor', 'refractor-one-sided', 'refractor-interpolated'].flatMap((role) => byRole(root, role));
      const vertices = lines.flatMap((l) => (l.getAttribute('points') ?? '').trim().split(/\s+/).map((p) => p.split(',').map(Number)));
      const covered = interpretation.stations.filter((s) => s.refractorElevation !== null).length;
      const singles = byRole(root, 'refractor-point').length;
      const distinct = new Set(vertices.map(([px]) => Math.round(toX(px) * 1000) / 1000));
      expect(distinct.size + singles).toBe(covered);
      for (const [px, py] of vertices) {
        const x = Math.round(toX(px) * 1000) / 1000;
        const expected = byX.get(x);
        expect(expected).not.toBeNull();
        expect(expected).toBeDefined();
        expect(Math.abs(toZ(py) - (expected as number))).toBeLessThan(0.01);
      }
      expect(byRole(root, 'geophone')).toHaveLength(survey.geophones.length);
      // Shots beyond the sheet's end are named at its edge instead of drawn in place.
      expect(byRole(root, 'shot').length + byRole(root, 'shot-off-sheet').length).toBe(survey.shots.length);
      expect(byRole(root, 'caution').length).toBe(interpretation.cautions.length);
    });

    it(`${label}: time–distance plot has a marker per pick and a line per fitted branch`, () => {
      const survey = make();
      const interpretation = interpret(survey);
      const root = parseSvg(renderTravelTimes(survey, interpretation));
      const picks = survey.shots.reduce((n, s) => n + s.times.filter((t) => t !== null).length, 0);
      expect(byRole(root, 'pick')).toHaveLength(picks);
      const branches = interpretation.shots.reduce(
        (n, a) => n + [a.left, a.right].reduce((m, side) => m + (side ? (side.direct ? 1 : 0) + side.refracted.length : 0), 0),
        0,
      );
      expect(branches).toBeGreaterThan(0);
      expect(byRole(root, 'branch')).toHaveLength(branches);
      expect(byRole(root, 'reciprocal-label')).toHaveLength(interpretation.qc.reciprocal.length);
    });
  }
});
