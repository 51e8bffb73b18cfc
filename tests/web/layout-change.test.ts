// The page asks before storing another geophone layout as a revision of a stored line: what
// it says must name the change (count, extent, spacing, moved geophones), and the same layout
// must pass silently. The confirmation it sends is the one named in api.js.
import { describe, expect, it } from 'vitest';
import { layoutChange, layoutWords } from '../../web/layout-change.js';
import { LAYOUT_CHANGE_CONFIRMATION, LAYOUT_CHANGED_STATUS, revisionsPath } from '../../web/api.js';

const spread = (count: number, spacingM: number, startM = 0) => Array.from({ length: count }, (_, i) => startM + i * spacingM);

describe('layoutWords', () => {
  it('names count, extent and a regular spacing', () => {
    expect(layoutWords(spread(24, 3))).toBe('24 geophones from 0.0 to 69.0 m, every 3.0 m');
    expect(layoutWords([0, 2, 5, 9])).toBe('4 geophones from 0.0 to 9.0 m, irregularly spaced');
    expect(layoutWords([12])).toBe('1 geophone at 12.0 m');
    expect(layoutWords([])).toBe('no geophones');
  });
});

describe('layoutChange', () => {
  it('is silent for the same layout, also within the service\'s 1 mm tolerance, and speaks past it as the service does', () => {
    expect(layoutChange(spread(24, 3), spread(24, 3))).toBeNull();
    expect(layoutChange(spread(24, 3), spread(24, 3).map((x) => x + 0.0009))).toBeNull();
    expect(layoutChange(spread(24, 3), spread(24, 3).map((x) => x + 0.004))).not.toBeNull();
  });

  it('names both layouts when the geophone count differs', () => {
    expect(layoutChange(spread(24, 3), spread(48, 2))).toBe(
      'The stored line has 24 geophones from 0.0 to 69.0 m, every 3.0 m; this file has 48 geophones from 0.0 to 94.0 m, every 2.0 m.',
    );
  });

  it('names the moved geophones with their surveyed positions when count and extent are the same', () => {
    const moved = spread(24, 3);
    moved[4] = 12.5;
    expect(layoutChange(spread(24, 3), moved)).toBe('Both have 24 geophones from 0.0 to 69.0 m, but one geophone has moved: geophone 5 from 12 to 12.5 m.');
    const several = spread(24, 3);
    for (const i of [2, 5, 8, 11]) several[i] += 0.25;
    expect(layoutChange(spread(24, 3), several)).toBe(
      'Both have 24 geophones from 0.0 to 69.0 m, but 4 geophones have moved: geophone 3 from 6 to 6.25 m, geophone 6 from 15 to 15.25 m, geophone 9 from 24 to 24.25 m and 1 more.',
    );
  });

  it('names both layouts when the extent differs', () => {
    expect(layoutChange(spread(24, 3), spread(24, 2))).toBe(
      'The stored line has 24 geophones from 0.0 to 69.0 m, every 3.0 m; this file has 24 geophones from 0.0 to 46.0 m, every 2.0 m: 23 of the 24 geophones are at other positions.',
    );
  });
});

describe('the confirmation sent to the service', () => {
  it('is added to the revisions path only when the user agreed', () => {
    expect(revisionsPath('A b')).toBe('api/v1/surveys/A%20b/revisions');
    expect(revisionsPath('A b', true)).toBe(`api/v1/surveys/A%20b/revisions?${LAYOUT_CHANGE_CONFIRMATION}`);
    expect(LAYOUT_CHANGE_CONFIRMATION).toBe('layoutChange=confirm');
    // api-v1.md: a revision with another geophone layout is refused with 409.
    expect(LAYOUT_CHANGED_STATUS).toBe(409);
  });
});
