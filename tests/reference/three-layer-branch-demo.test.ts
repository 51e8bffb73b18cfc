import { describe, expect, it } from 'vitest';
import { demoLine, demoLineModel } from '../../engine/samples/demo-lines.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import { verticalDepthToRefractor } from '../../engine/forward/planar-refractor.js';

/**
 * The main demo line (engine/samples/demo-lines.ts) is two layers: V1 = 700 m/s over a
 * planar refractor of V2 = 2800 m/s dipping 3.5°, under ground with a 0.3 m swell. Its picks
 * are the closed-form first arrivals of Kearey, Brooks & Hill (An Introduction to
 * Geophysical Exploration, 3rd ed., 2002, ch. 5: head wave (dA + dB)·cos(ic)/V1 + L/V2)
 * rounded to 0.1 ms. Topography bends its apparent-velocity curves; that bend must not be
 * read as a second refractor.
 */
describe('demo line: topography does not invent a second refractor (closed form, Kearey et al. 2002 ch. 5)', () => {
  const survey = demoLine();
  const model = demoLineModel();
  const result = interpret(survey);

  it('assigns no pick to a second refractor and fits one refracted line per side', () => {
    for (const shot of assignBranches(survey)) {
      expect(shot.branchOfPick.includes(2), shot.id).toBe(false);
      for (const side of [shot.left, shot.right]) if (side) expect(side.refracted.length, `${shot.id} ${side.side}`).toBeLessThanOrEqual(1);
    }
  });

  it('interprets two layers with no coverage gap and no second-refractor warning', () => {
    expect(result.layers).toHaveLength(2);
    const codes = result.qc.warnings.map((w) => w.code);
    expect(codes).not.toContain('no-coverage');
    expect(codes.filter((c) => c.startsWith('second-refractor'))).toEqual([]);
    for (const s of result.stations) expect(s.depths).toHaveLength(1);
  });

  it('gives every one of the 24 geophones a depth within 2 % of the model', () => {
    expect(result.stations).toHaveLength(24);
    for (const s of result.stations) {
      const truth = verticalDepthToRefractor(model.refractor, { x: s.x, elevation: s.elevation });
      expect(s.depth, `x = ${s.x}`).not.toBeNull();
      expect(Math.abs((s.depth as number) - truth) / truth, `x = ${s.x}`).toBeLessThanOrEqual(0.02);
      expect(s.depths[0]).toBe(s.depth);
    }
  });

  it('still shows no second refractor when the pick uncertainty is set as low as 0.05 ms (the velocity-contrast rule alone)', () => {
    const tight = { ...survey, options: { pickUncertaintyMs: 0.05 } };
    for (const shot of assignBranches(tight)) expect(shot.branchOfPick.includes(2), shot.id).toBe(false);
  });
});
