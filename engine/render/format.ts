/**
 * Number formatting for labels. Written out by hand (no Intl) so the output does not
 * depend on the machine's locale: every render of the same interpretation is identical.
 */

/** Groups thousands with commas: 12480 → "12,480". Integers only; rounds first. */
export function groupThousands(value: number): string {
  const rounded = Math.round(value);
  const sign = rounded < 0 ? '-' : '';
  const digits = String(Math.abs(rounded));
  return sign + digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * A velocity label, rounded to 10 m/s (the precision a refraction velocity is quoted to,
 * common practice): 2483.2 → "2,480 m/s".
 */
export function formatVelocity(velocityMPerS: number): string {
  return `${groupThousands(Math.round(velocityMPerS / 10) * 10)} m/s`;
}

/** Fixed decimals without "-0.0". */
export function fixed(value: number, decimals: number): string {
  const text = value.toFixed(decimals);
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

/** Metres to one decimal: "2.8 m". */
export function formatMetres(valueM: number): string {
  return `${fixed(valueM, 1)} m`;
}

/** Milliseconds to one decimal: "0.4 ms". */
export function formatMs(valueMs: number): string {
  return `${fixed(valueMs, 1)} ms`;
}

/** A tick label: as many decimals as the tick step needs, no more. */
export function formatTick(value: number, step: number): string {
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return fixed(value, decimals);
}

/** Rounds plot coordinates to 1/1000 mm: keeps the SVG small and the output stable. */
export function round3(value: number): number {
  return Math.round(value * 1000) / 1000;
}
