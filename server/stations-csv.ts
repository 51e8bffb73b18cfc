/**
 * The station table as CSV (RFC 4180: comma separated, CRLF line ends, quotes doubled):
 * a header row with units in the column names, then one row per geophone in line order.
 * Every Station field has a column; `depths` is spread into one column per refractor
 * (depth_to_refractor_1_m, …). Null or absent values are empty cells. Fields the engine
 * adds later appear after the known ones, named in snake_case.
 */
import type { Interpretation, Station } from '../engine/output/interpretation.js';

interface Column {
  header: string;
  value: (station: Station) => unknown;
}

/** Known Station fields in table order, with units in the header. */
const KNOWN_COLUMNS: readonly { key: keyof Station; header: string }[] = [
  { key: 'x', header: 'x_m' },
  { key: 'elevation', header: 'elevation_m' },
  { key: 'delayTime', header: 'delay_time_ms' },
  { key: 'depth', header: 'depth_m' },
  { key: 'refractorElevation', header: 'refractor_elevation_m' },
  { key: 'v1', header: 'v1_m_per_s' },
  { key: 'refractorVelocity', header: 'refractor_velocity_m_per_s' },
  { key: 'depthUncertainty', header: 'depth_uncertainty_m' },
  { key: 'normalDepth', header: 'normal_depth_m' },
  { key: 'plusTime', header: 'plus_time_ms' },
  { key: 'minusTime', header: 'minus_time_ms' },
  { key: 'coverage', header: 'coverage' },
  { key: 'pairCount', header: 'pair_count' },
];

const KNOWN_KEYS = new Set<string>([...KNOWN_COLUMNS.map((c) => c.key as string), 'depths']);

function snakeCase(key: string): string {
  return key.replace(/([a-z0-9])([A-Z])/g, '$1_$2').replace(/[^A-Za-z0-9_]/g, '_').toLowerCase();
}

/** Millimetre / microsecond resolution is far finer than any refraction result. */
function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return '';
  const rounded = Math.round(value * 1000) / 1000;
  return Object.is(rounded, -0) ? '0' : String(rounded);
}

/** One cell; text that could start a spreadsheet formula is prefixed with an apostrophe. */
export function csvCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return formatNumber(value);
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  let text = typeof value === 'string' ? value : JSON.stringify(value);
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

function columnsFor(stations: readonly Station[]): Column[] {
  const columns: Column[] = [];
  const present = (key: keyof Station): boolean => stations.some((s) => s[key] !== undefined);
  for (const { key, header } of KNOWN_COLUMNS) {
    // The contract's fields always have a column; the optional ones only when the engine gave them.
    const required = ['x', 'elevation', 'delayTime', 'depth', 'refractorElevation', 'v1', 'refractorVelocity'].includes(key);
    if (required || present(key)) columns.push({ header, value: (s) => s[key] });
    if (key === 'refractorElevation') {
      const refractors = Math.max(1, ...stations.map((s) => (Array.isArray(s.depths) ? s.depths.length : 0)));
      for (let i = 0; i < refractors; i += 1) {
        columns.push({ header: `depth_to_refractor_${i + 1}_m`, value: (s) => (Array.isArray(s.depths) ? s.depths[i] : null) });
      }
    }
  }
  const extraKeys = new Set<string>();
  for (const station of stations) {
    for (const [key, value] of Object.entries(station)) {
      if (!KNOWN_KEYS.has(key) && (value === null || ['number', 'string', 'boolean'].includes(typeof value))) {
        extraKeys.add(key);
      }
    }
  }
  for (const key of extraKeys) {
    columns.push({ header: snakeCase(key), value: (s) => (s as unknown as Record<string, unknown>)[key] });
  }
  return columns;
}

export function stationsCsv(interpretation: Interpretation): string {
  const columns = columnsFor(interpretation.stations);
  const lines = [columns.map((c) => c.header).join(',')];
  for (const station of interpretation.stations) {
    lines.push(columns.map((c) => csvCell(c.value(station))).join(','));
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** A file name safe in a Content-Disposition header. */
export function downloadName(lineName: string, suffix: string): string {
  const base = lineName
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return `${base === '' ? 'line' : base}-${suffix}`;
}
