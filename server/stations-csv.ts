/**
 * The station table as CSV (RFC 4180: comma separated, CRLF line ends, quotes doubled):
 * a header row with units in the column names, then one row per geophone in line order.
 * The columns, their names and decimals are the page's own (web/station-columns.js), so the
 * file, the page and the share page agree. Null or absent values are empty cells. Station
 * fields that have no declared column yet (added by the engine later) follow, in snake_case,
 * so nothing the engine computes is left out of the file.
 */
import type { Interpretation, Station } from '../engine/output/interpretation.js';
import { cellData, DECLARED_STATION_FIELDS, stationColumns } from '../web/station-columns.js';

interface Column {
  header: string;
  cell: (station: Station) => string;
}

const DECLARED = new Set<string>(DECLARED_STATION_FIELDS);

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
  const columns: Column[] = stationColumns(stations).map((c) => ({
    header: c.csvHeader,
    // Numbers are formatted with the column's decimals (never a formula); text is defused.
    cell: (s: Station) => (c.decimals === null ? csvCell(c.value(s)) : cellData(c, s)),
  }));
  const extraKeys = new Set<string>();
  for (const station of stations) {
    for (const [key, value] of Object.entries(station)) {
      if (!DECLARED.has(key) && (value === null || ['number', 'string', 'boolean'].includes(typeof value))) {
        extraKeys.add(key);
      }
    }
  }
  for (const key of extraKeys) {
    columns.push({ header: snakeCase(key), cell: (s) => csvCell((s as unknown as Record<string, unknown>)[key]) });
  }
  return columns;
}

export function stationsCsv(interpretation: Interpretation): string {
  const columns = columnsFor(interpretation.stations);
  const lines = [columns.map((c) => c.header).join(',')];
  for (const station of interpretation.stations) {
    lines.push(columns.map((c) => c.cell(station)).join(','));
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
