// The gather display's geometry (web/gather-plot.js): a click maps back to the trace and
// time it was drawn at (the mappings are each other's inverses, a property of the linear
// maps, not a recorded answer), the window and the edited picks.
import { describe, expect, it } from 'vitest';
import { plotLayout, reviewWindow, withPick, PLOT_MARGIN, pickMarks, checkFirst, PICK_BAR_PX, LOW_PICK_CONFIDENCE } from '../../web/gather-plot.js';

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

describe('pick marks and the check-first list', () => {
  // The picker's answer for five traces; confidence as engine/picking/pick-gather.ts gives it.
  const automatic = { times: [10, 12.5, 15, null, 20], confidence: [0.9, 0.3, 0.1, 0, 1] };

  it("shows confidence only where the pick is still the picker's, thicker the more confident, hollow under 0.5", () => {
    const stored = [10, 12.5, 15.5, null, 20];
    const shown = [10, 12.5, 15.5, null, 21];
    const marks = pickMarks(shown, stored, automatic);
    expect(marks.map((m) => m.kind)).toEqual(['automatic', 'low', 'reviewed', 'none', 'edited']);
    expect(marks[0].confidence).toBe(0.9);
    expect(marks[2].confidence).toBeNull();
    // Linear from the thin bar at confidence 0 to the thick one at 1.
    expect(marks[0].thickness).toBeCloseTo(PICK_BAR_PX.thin + 0.9 * (PICK_BAR_PX.thick - PICK_BAR_PX.thin), 9);
    expect(marks[0].thickness).toBeGreaterThan(marks[1].thickness);
    expect(LOW_PICK_CONFIDENCE).toBe(0.5);
  });

  it('lists the low-confidence picks, least confident first', () => {
    const marks = pickMarks([10, 12.5, 15, null, 20], [10, 12.5, 15, null, 20], automatic);
    expect(checkFirst(marks)).toEqual([2, 1]);
  });

  it('without the picker\'s answer every stored pick is plain', () => {
    expect(pickMarks([1, null], [1, null], undefined).map((m) => m.kind)).toEqual(['reviewed', 'none']);
  });
});
