// The gather display's geometry (web/gather-plot.js): a click maps back to the trace and
// time it was drawn at (the mappings are each other's inverses, a property of the linear
// maps, not a recorded answer), the window and the edited picks.
import { describe, expect, it } from 'vitest';
import { plotLayout, reviewWindow, withPick, PLOT_MARGIN } from '../../web/gather-plot.js';

describe('plotLayout', () => {
  const layout = plotLayout(960, 440, 24, -10, 58);
  it('puts the traces side by side inside the margins and time downward', () => {
    expect(layout.traceX(0)).toBeGreaterThan(PLOT_MARGIN.left);
    expect(layout.traceX(23)).toBeLessThan(960 - PLOT_MARGIN.right);
    expect(layout.timeY(-10)).toBe(PLOT_MARGIN.top);
    expect(layout.timeY(58)).toBe(440 - PLOT_MARGIN.bottom);
    expect(layout.timeY(30)).toBeGreaterThan(layout.timeY(20));
  });
  it('maps a click back to the trace and time drawn there, clamped to the plot', () => {
    for (let i = 0; i < 24; i++) expect(layout.traceAt(layout.traceX(i))).toBe(i);
    for (const t of [-10, 0, 12.5, 57.9]) expect(layout.timeAt(layout.timeY(t))).toBeCloseTo(t, 9);
    expect(layout.traceAt(0)).toBe(0);
    expect(layout.traceAt(5000)).toBe(23);
    expect(layout.timeAt(-100)).toBe(-10);
    expect(layout.timeAt(10_000)).toBe(58);
  });
});

describe('reviewWindow and withPick', () => {
  it('shows the record up to 1.5 × the latest pick + 10 ms, never past the record', () => {
    expect(reviewWindow([10, null, 32], -10, 118)).toEqual({ fromMs: -10, toMs: 58 });
    expect(reviewWindow([100], -10, 118)).toEqual({ fromMs: -10, toMs: 118 });
    expect(reviewWindow([null, null], -10, 118)).toEqual({ fromMs: -10, toMs: 118 });
  });
  it('moves a pick (to 0.01 ms) or clears it, on a copy', () => {
    const times = [1, 2, 3];
    expect(withPick(times, 1, 7.12345)).toEqual([1, 7.12, 3]);
    expect(withPick(times, 2, null)).toEqual([1, 2, null]);
    expect(times).toEqual([1, 2, 3]);
  });
});
