/**
 * Tick steps of 1, 2 or 5 × 10^n, the steps a reader can count along an axis.
 */

/** The smallest 1/2/5 × 10^n step that gives at most `maxTicks` intervals over `span`. */
export function niceStep(span: number, maxTicks: number): number {
  if (!(span > 0) || !Number.isFinite(span)) return 1;
  const raw = span / Math.max(1, maxTicks);
  const power = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const multiple of [1, 2, 5, 10]) {
    if (multiple * power >= raw - 1e-12 * power) return multiple * power;
  }
  return 10 * power;
}

/** Multiples of `step` inside [min, max], snapped so 0.1 + 0.2 noise never shows. */
export function tickValues(min: number, max: number, step: number): number[] {
  const first = Math.ceil(min / step - 1e-9);
  const last = Math.floor(max / step + 1e-9);
  const values: number[] = [];
  for (let i = first; i <= last; i++) values.push(Number((i * step).toPrecision(12)));
  return values;
}

/** Next value of the 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 × 10^n ladder at or below `value` (≥ 1). */
export function niceExaggerationAtMost(value: number): number {
  if (!(value > 1) || !Number.isFinite(value)) return 1;
  const ladder = [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8];
  const power = Math.pow(10, Math.floor(Math.log10(value)));
  let best = 1;
  for (const multiple of ladder) {
    const candidate = multiple * power;
    if (candidate <= value * (1 + 1e-9)) best = candidate;
  }
  return Math.max(1, best);
}
