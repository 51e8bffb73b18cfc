/**
 * A linear scale from data units (m, ms) to plot units (mm on the page), d3-style:
 * a function with its domain, range and inverse attached.
 */
export interface LinearScale {
  (value: number): number;
  readonly domain: readonly [number, number];
  readonly range: readonly [number, number];
  /** Plot units per data unit (negative when the range runs backwards, e.g. elevation up). */
  readonly plotPerUnit: number;
  invert(plot: number): number;
}

export function linearScale(domain: readonly [number, number], range: readonly [number, number]): LinearScale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  if (!Number.isFinite(d0) || !Number.isFinite(d1) || d0 === d1) {
    throw new Error(`linearScale: domain must be two different finite numbers, got [${d0}, ${d1}]`);
  }
  const plotPerUnit = (r1 - r0) / (d1 - d0);
  const scale = ((value: number) => r0 + (value - d0) * plotPerUnit) as LinearScale;
  Object.defineProperties(scale, {
    domain: { value: [d0, d1] as const },
    range: { value: [r0, r1] as const },
    plotPerUnit: { value: plotPerUnit },
    invert: { value: (plot: number) => d0 + (plot - r0) / plotPerUnit },
  });
  return scale;
}
