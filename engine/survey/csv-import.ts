/**
 * The pick table: Arcline's own CSV layout for a refraction line, one row per pick.
 *
 *   # name: Demo A, pump-station terrace
 *   # date: synthetic, no field day
 *   shot_id,shot_x_m,shot_elevation_m,geophone_x_m,geophone_elevation_m,time_ms
 *   W-off,-24,86.53,0,86,33.1
 *
 * Optional leading comment lines `# name: …` and `# date: …` (other leading `#` lines are
 * ignored), then a header with exactly the six columns above (any order, any case, spaces
 * around names trimmed), then one row per shot–geophone pair. A blank time_ms is no pick;
 * blank elevations are absent. Fields are comma-separated with optional RFC 4180 double
 * quoting ("" inside quotes is one quote); lines end in LF or CRLF; a UTF-8 BOM is skipped.
 *
 * Geophones are the sorted distinct geophone_x_m values; shots keep the order in which they
 * first appear. The resulting survey then goes through validateSurvey; its problems are
 * placed back on the table (placeSurveyProblem): path "/csv/line/<n>/<column>", `line` and
 * `column`, and the message led by "line n, column c (name): ", so a user of a pick table is
 * told where in the file to look, never a JSON pointer into a document they did not write.
 */
import { SURVEY_LIMITS } from './survey.js';
import type { Geophone, Shot, Survey } from './survey.js';
import type { Problem } from './problem.js';
import { validateSurvey } from './validate.js';

export type PickTableImport = { survey: Survey; problems: [] } | { survey: null; problems: Problem[] };

/** Largest pick table accepted, bytes of UTF-8 (5 MiB). */
export const MAX_PICK_TABLE_BYTES = 5 * 1024 * 1024;
/** Most data rows accepted (a full 1024-geophone, 64-shot line has 65 536). */
export const MAX_PICK_TABLE_ROWS = 100_000;
/** Positions and elevations repeated on several rows must agree within this, m. */
export const REPEAT_TOLERANCE_M = 0.001;
/** Most problems reported from one table. */
const MAX_CSV_PROBLEMS = 100;

export const PICK_TABLE_COLUMNS = ['shot_id', 'shot_x_m', 'shot_elevation_m', 'geophone_x_m', 'geophone_elevation_m', 'time_ms'] as const;
type Column = (typeof PICK_TABLE_COLUMNS)[number];

/** One CSV record: its fields and the physical line (1-based) where it starts. */
interface CsvRecord {
  line: number;
  fields: string[];
  /** Whether each field was double-quoted (its spaces are then kept). */
  quoted: boolean[];
}

class CsvError {
  constructor(
    readonly line: number,
    readonly code: string,
    readonly message: string,
  ) {}
}

/**
 * Splits CSV text into records (RFC 4180: comma separators, double-quoted fields with ""
 * escapes, CRLF or LF line ends; a lone CR is also taken as a line end), from text[startIndex]
 * which lies on physical line startLine. Throws CsvError on a broken quote.
 */
function* readRecords(text: string, startIndex: number, startLine: number): Generator<CsvRecord> {
  let i = startIndex;
  let line = startLine;
  const n = text.length;
  while (i < n) {
    const startLine = line;
    const fields: string[] = [];
    const quoted: boolean[] = [];
    let field = '';
    for (;;) {
      if (i < n && text[i] === '"' && field.trim() === '') {
        // Quoted field; spaces before the opening quote are tolerated and dropped.
        const quoteLine = line;
        i++;
        field = '';
        let closed = false;
        while (i < n) {
          const c = text[i];
          if (c === '"') {
            if (text[i + 1] === '"') {
              field += '"';
              i += 2;
              continue;
            }
            i++;
            closed = true;
            break;
          }
          if (c === '\n' || (c === '\r' && text[i + 1] !== '\n')) line++;
          field += c;
          i++;
        }
        if (!closed) throw new CsvError(quoteLine, 'unterminated-quote', `line ${quoteLine}: a quoted field opens here but its closing double quote is missing.`);
        // Only spaces may follow the closing quote before the separator.
        while (i < n && (text[i] === ' ' || text[i] === '\t')) i++;
        if (i < n && text[i] !== ',' && text[i] !== '\n' && text[i] !== '\r') {
          throw new CsvError(line, 'text-after-quote', `line ${line}: unexpected text after a closing double quote; write a quote inside a quoted field as "".`);
        }
        fields.push(field);
        quoted.push(true);
        field = '';
      } else {
        while (i < n && text[i] !== ',' && text[i] !== '\n' && text[i] !== '\r') {
          if (text[i] === '"') {
            throw new CsvError(line, 'stray-quote', `line ${line}: a double quote inside an unquoted field; quote the whole field and write the quote as "".`);
          }
          field += text[i];
          i++;
        }
        fields.push(field);
        quoted.push(false);
        field = '';
      }
      if (i >= n) break;
      if (text[i] === ',') {
        i++;
        continue;
      }
      // End of line.
      if (text[i] === '\r' && text[i + 1] === '\n') i += 2;
      else i++;
      line++;
      break;
    }
    yield { line: startLine, fields, quoted };
  }
}

/** Index of the line break (CR or LF) that ends the line starting at start, or text.length. */
function nextLineEnd(text: string, start: number): number {
  for (let i = start; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) return i;
  }
  return text.length;
}

/** UTF-8 byte length of a string, without allocating. */
function utf8Length(text: string): number {
  let bytes = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) bytes += 1;
    else if (c < 0x800) bytes += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      bytes += 4;
      i++;
    } else bytes += 3;
  }
  return bytes;
}

const NUMBER_PATTERN = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

function quoteForMessage(value: string): string {
  const cut = value.length > 40 ? `${value.slice(0, 40)}…` : value;
  return `'${cut}'`;
}

interface Seen {
  value: number | undefined;
  line: number;
}

/**
 * Converts a pick table (CSV text) to a survey document and validates it.
 * Problems carry paths "/csv/line/<n>/<column>" (or "/csv" for the whole table); problems
 * found by validateSurvey keep their survey paths.
 */
export function importPickTable(csvText: string): PickTableImport {
  const problems: Problem[] = [];
  const fail = (): PickTableImport => ({ survey: null, problems });
  if (typeof csvText !== 'string') {
    problems.push({ path: '/csv', code: 'csv-not-text', message: 'The pick table must be CSV text.' });
    return fail();
  }
  if (csvText.length > MAX_PICK_TABLE_BYTES || utf8Length(csvText) > MAX_PICK_TABLE_BYTES) {
    problems.push({
      path: '/csv',
      code: 'csv-too-large',
      message: `The pick table is larger than ${MAX_PICK_TABLE_BYTES / (1024 * 1024)} MB; split the line or remove unused rows.`,
    });
    return fail();
  }
  const text = csvText.charCodeAt(0) === 0xfeff ? csvText.slice(1) : csvText;
  const add = (line: number, column: Column | null, code: string, message: string): void => {
    if (problems.length === MAX_CSV_PROBLEMS) {
      problems.push({ path: '/csv', code: 'too-many-problems', message: `Stopped after ${MAX_CSV_PROBLEMS} problems; fix these and import again to see the rest.` });
    }
    if (problems.length > MAX_CSV_PROBLEMS) return;
    const problem: Problem = { path: column ? `/csv/line/${line}/${column}` : `/csv/line/${line}`, code, message, line };
    if (column !== null && columnIndex !== null) problem.column = columnIndex[column] + 1;
    problems.push(problem);
  };

  let name: string | undefined;
  let date: string | undefined;
  let nameLine = 0;
  let dateLine = 0;
  let columnIndex: Record<Column, number> | null = null;
  let dataRows = 0;

  // Geophones by x; shots by id in order of first appearance; picks by (shot, geophone x).
  const geophoneElevation = new Map<number, Seen>();
  const geophoneFirstLine = new Map<number, number>();
  const shotOrder: string[] = [];
  const shotInfo = new Map<string, { x: Seen; elevation: Seen }>();
  const picks = new Map<string, Map<number, { timeMs: number | null; line: number }>>();

  // Leading comment lines are read as plain lines, not CSV, so a name may hold commas and quotes.
  let start = 0;
  let startLine = 1;
  for (;;) {
    const end = nextLineEnd(text, start);
    const content = text.slice(start, end).trim();
    if (content !== '' && !content.startsWith('#')) break;
    const m = /^#\s*(name|date)\s*:(.*)$/i.exec(content);
    if (m) {
      if (m[1].toLowerCase() === 'name') {
        name = m[2].trim();
        nameLine = startLine;
      } else {
        date = m[2].trim();
        dateLine = startLine;
      }
    }
    if (end >= text.length) {
      start = text.length;
      break;
    }
    start = text[end] === '\r' && text[end + 1] === '\n' ? end + 2 : end + 1;
    startLine++;
  }

  try {
    for (const record of readRecords(text, start, startLine)) {
      const { line, fields, quoted } = record;
      const blank = fields.every((f) => f.trim() === '');
      if (columnIndex === null) {
        columnIndex = readHeader(fields, line, add);
        if (columnIndex === null) return fail();
        continue;
      }
      if (blank) continue;
      dataRows++;
      if (dataRows > MAX_PICK_TABLE_ROWS) {
        problems.push({
          path: '/csv',
          code: 'too-many-rows',
          message: `The pick table has more than ${MAX_PICK_TABLE_ROWS} data rows; a line of ${SURVEY_LIMITS.maxGeophones} geophones and ${SURVEY_LIMITS.maxShots} shots needs at most ${SURVEY_LIMITS.maxGeophones * SURVEY_LIMITS.maxShots}.`,
        });
        return fail();
      }
      if (fields.length !== PICK_TABLE_COLUMNS.length) {
        add(line, null, 'field-count', `line ${line}: has ${fields.length} fields but the header has ${PICK_TABLE_COLUMNS.length}.`);
        continue;
      }
      // Unquoted values are trimmed; a quoted value is kept exactly (a shot name may need its spaces).
      const cell = (c: Column): string => (quoted[columnIndex![c]] ? fields[columnIndex![c]] : fields[columnIndex![c]].trim());
      const where = (c: Column): string => `line ${line}, column ${columnIndex![c] + 1} (${c})`;
      let rowOk = true;
      const number = (c: Column, required: boolean): number | undefined => {
        const raw = cell(c).trim();
        if (raw === '') {
          if (required) {
            add(line, c, 'missing-value', `${where(c)}: is empty but a number is needed.`);
            rowOk = false;
          }
          return undefined;
        }
        if (!NUMBER_PATTERN.test(raw)) {
          add(line, c, 'not-a-number', `${where(c)}: ${quoteForMessage(raw)} is not a number.`);
          rowOk = false;
          return undefined;
        }
        const value = Number(raw);
        if (!Number.isFinite(value)) {
          add(line, c, 'not-a-number', `${where(c)}: ${quoteForMessage(raw)} is too large to be a number.`);
          rowOk = false;
          return undefined;
        }
        return value;
      };
      const shotId = cell('shot_id');
      if (shotId.trim() === '') {
        add(line, 'shot_id', 'missing-value', `${where('shot_id')}: is empty but every row needs the name of its shot.`);
        rowOk = false;
      }
      const shotX = number('shot_x_m', true);
      const shotElevation = number('shot_elevation_m', false);
      const geophoneX = number('geophone_x_m', true);
      const geophoneElev = number('geophone_elevation_m', false);
      const timeMs = number('time_ms', false);
      if (!rowOk || shotX === undefined || geophoneX === undefined) continue;

      // Geophone: its elevation must be the same on every row that gives one.
      const g = geophoneElevation.get(geophoneX);
      if (g === undefined) {
        if (geophoneElevation.size >= SURVEY_LIMITS.maxGeophones) {
          add(line, 'geophone_x_m', 'too-many-geophones', `${where('geophone_x_m')}: this is geophone number ${geophoneElevation.size + 1}; at most ${SURVEY_LIMITS.maxGeophones} geophones are accepted.`);
          return fail();
        }
        geophoneElevation.set(geophoneX, { value: geophoneElev, line });
        geophoneFirstLine.set(geophoneX, line);
      } else if (geophoneElev !== undefined) {
        if (g.value === undefined) {
          g.value = geophoneElev;
          g.line = line;
        } else if (Math.abs(g.value - geophoneElev) > REPEAT_TOLERANCE_M) {
          add(
            line,
            'geophone_elevation_m',
            'geophone-elevation-mismatch',
            `${where('geophone_elevation_m')}: the geophone at x = ${geophoneX} m has elevation ${geophoneElev} m here but ${g.value} m on line ${g.line}; they must agree within 1 mm.`,
          );
        }
      }

      // Shot: its position and elevation must be the same on every row.
      let s = shotInfo.get(shotId);
      if (s === undefined) {
        if (shotInfo.size >= SURVEY_LIMITS.maxShots) {
          add(line, 'shot_id', 'too-many-shots', `${where('shot_id')}: shot "${shotId}" is shot number ${shotInfo.size + 1}; at most ${SURVEY_LIMITS.maxShots} shots are accepted.`);
          return fail();
        }
        s = { x: { value: shotX, line }, elevation: { value: shotElevation, line } };
        shotInfo.set(shotId, s);
        shotOrder.push(shotId);
        picks.set(shotId, new Map());
      } else {
        if (Math.abs((s.x.value as number) - shotX) > REPEAT_TOLERANCE_M) {
          add(line, 'shot_x_m', 'shot-x-mismatch', `${where('shot_x_m')}: shot "${shotId}" is at x = ${shotX} m here but at x = ${s.x.value} m on line ${s.x.line}; they must agree within 1 mm.`);
        }
        if (shotElevation !== undefined) {
          if (s.elevation.value === undefined) {
            s.elevation = { value: shotElevation, line };
          } else if (Math.abs(s.elevation.value - shotElevation) > REPEAT_TOLERANCE_M) {
            add(
              line,
              'shot_elevation_m',
              'shot-elevation-mismatch',
              `${where('shot_elevation_m')}: shot "${shotId}" has elevation ${shotElevation} m here but ${s.elevation.value} m on line ${s.elevation.line}; they must agree within 1 mm.`,
            );
          }
        }
      }

      const shotPicks = picks.get(shotId)!;
      const earlier = shotPicks.get(geophoneX);
      if (earlier !== undefined) {
        add(line, 'geophone_x_m', 'duplicate-pick', `line ${line}: shot "${shotId}" at the geophone at x = ${geophoneX} m appears again; it is already on line ${earlier.line}. Keep one row per shot and geophone.`);
        continue;
      }
      shotPicks.set(geophoneX, { timeMs: timeMs ?? null, line });
    }
  } catch (e) {
    if (e instanceof CsvError) {
      problems.push({ path: `/csv/line/${e.line}`, code: e.code, message: e.message, line: e.line });
      return fail();
    }
    throw e;
  }

  if (columnIndex === null) {
    problems.push({ path: '/csv', code: 'missing-header', message: `The pick table has no header row; it needs the columns ${PICK_TABLE_COLUMNS.join(', ')}.` });
    return fail();
  }
  if (problems.length > 0) return fail();
  if (dataRows === 0) {
    problems.push({ path: '/csv', code: 'no-rows', message: 'The pick table has a header but no rows of picks.' });
    return fail();
  }

  const geophoneXs = [...geophoneElevation.keys()].sort((a, b) => a - b);
  const geophones: Geophone[] = geophoneXs.map((x) => {
    const e = geophoneElevation.get(x)!.value;
    return e === undefined ? { x } : { x, elevation: e };
  });
  const shots: Shot[] = shotOrder.map((id) => {
    const info = shotInfo.get(id)!;
    const shotPicks = picks.get(id)!;
    const shot: Shot = { id, x: info.x.value as number, times: geophoneXs.map((x) => shotPicks.get(x)?.timeMs ?? null) };
    if (info.elevation.value !== undefined) shot.elevation = info.elevation.value;
    return shot;
  });
  const survey: Survey = { geophones, shots };
  if (name !== undefined) survey.name = name;
  if (date !== undefined) survey.date = date;
  const checked = validateSurvey(survey);
  if (checked.survey === null) {
    const origin: PickTableOrigin = {
      columnNumber: (c) => columnIndex![c] + 1,
      nameLine,
      dateLine,
      geophoneXs,
      geophoneLine: (x) => geophoneFirstLine.get(x) ?? 0,
      geophoneElevationLine: (x) => geophoneElevation.get(x)?.line ?? geophoneFirstLine.get(x) ?? 0,
      shotLine: (id) => shotInfo.get(id)?.x.line ?? 0,
      shotElevationLine: (id) => shotInfo.get(id)?.elevation.line ?? 0,
      pickLine: (id, x) => picks.get(id)?.get(x)?.line,
      shotIds: shotOrder,
    };
    return { survey: null, problems: checked.problems.map((p) => placeSurveyProblem(p, origin)) };
  }
  return { survey: checked.survey, problems: [] };
}

/** Where each part of the survey came from in the pick table (lines are 1-based; 0 = nowhere). */
interface PickTableOrigin {
  columnNumber: (column: Column) => number;
  nameLine: number;
  dateLine: number;
  geophoneXs: number[];
  geophoneLine: (x: number) => number;
  geophoneElevationLine: (x: number) => number;
  shotLine: (id: string) => number;
  shotElevationLine: (id: string) => number;
  pickLine: (id: string, x: number) => number | undefined;
  shotIds: string[];
}

/**
 * A problem validateSurvey found in the survey made from a pick table, placed on the line
 * and column of the table it came from (a pick's row, the first row of a shot or geophone,
 * the row that gave an elevation, the `# name:` line). Problems of the whole line
 * (coverage, too few geophones) stay on "/csv" with their message unchanged. O(1).
 */
function placeSurveyProblem(problem: Problem, origin: PickTableOrigin): Problem {
  const comment = /^\/(name|date)$/.exec(problem.path);
  if (comment) {
    const line = comment[1] === 'name' ? origin.nameLine : origin.dateLine;
    if (line > 0) return { path: `/csv/line/${line}`, code: problem.code, message: `line ${line} (# ${comment[1]}:): ${problem.message}`, line };
  }
  const place = (line: number, column: Column): Problem => {
    if (line <= 0) return { path: '/csv', code: problem.code, message: problem.message };
    const number = origin.columnNumber(column);
    return { path: `/csv/line/${line}/${column}`, code: problem.code, message: `line ${line}, column ${number} (${column}): ${problem.message}`, line, column: number };
  };
  const shot = /^\/shots\/(\d+)(?:\/([^/]+)(?:\/(\d+))?)?/.exec(problem.path);
  if (shot) {
    const id = origin.shotIds[Number(shot[1])];
    if (id !== undefined) {
      const field = shot[2];
      if (field === 'times') {
        const x = shot[3] === undefined ? undefined : origin.geophoneXs[Number(shot[3])];
        return place((x === undefined ? undefined : origin.pickLine(id, x)) ?? origin.shotLine(id), 'time_ms');
      }
      if (field === 'x') return place(origin.shotLine(id), 'shot_x_m');
      if (field === 'elevation') return place(origin.shotElevationLine(id), 'shot_elevation_m');
      return place(origin.shotLine(id), 'shot_id');
    }
  }
  const geophone = /^\/geophones\/(\d+)(?:\/([^/]+))?/.exec(problem.path);
  if (geophone) {
    const x = origin.geophoneXs[Number(geophone[1])];
    if (x !== undefined) {
      if (geophone[2] === 'elevation') return place(origin.geophoneElevationLine(x), 'geophone_elevation_m');
      return place(origin.geophoneLine(x), 'geophone_x_m');
    }
  }
  return { path: '/csv', code: problem.code, message: problem.message };
}

function readHeader(fields: string[], line: number, add: (line: number, column: Column | null, code: string, message: string) => void): Record<Column, number> | null {
  const index: Partial<Record<Column, number>> = {};
  let ok = true;
  fields.forEach((raw, i) => {
    const nameOfColumn = raw.trim().toLowerCase();
    if (!(PICK_TABLE_COLUMNS as readonly string[]).includes(nameOfColumn)) {
      add(line, null, 'unknown-column', `line ${line}, column ${i + 1}: header ${quoteForMessage(raw.trim())} is not a pick-table column; the columns are ${PICK_TABLE_COLUMNS.join(', ')}.`);
      ok = false;
      return;
    }
    const c = nameOfColumn as Column;
    if (index[c] !== undefined) {
      add(line, c, 'duplicate-column', `line ${line}, column ${i + 1}: column ${c} already appears as column ${index[c]! + 1}.`);
      ok = false;
      return;
    }
    index[c] = i;
  });
  for (const c of PICK_TABLE_COLUMNS) {
    if (index[c] === undefined) {
      add(line, c, 'missing-column', `line ${line}: the header has no ${c} column; the columns are ${PICK_TABLE_COLUMNS.join(', ')}.`);
      ok = false;
    }
  }
  return ok ? (index as Record<Column, number>) : null;
}

/** A CSV field, quoted only when it must be (comma, quote, line break, edge spaces, leading #). */
function csvField(value: string): string {
  if (/[",\r\n]/.test(value) || value !== value.trim() || value.startsWith('#')) return `"${value.replace(/"/g, '""')}"`;
  return value;
}

/** Comment text on one line. */
function oneLine(value: string): string {
  return value.replace(/[\r\n]+/g, ' ');
}

/**
 * Writes a survey as a pick table: name and date comments, the header, then one row per
 * shot and geophone (blank time_ms for no pick, so every geophone keeps a row). Numbers are
 * written in JavaScript's shortest round-trip form, so importPickTable gives the same
 * survey back (options are not part of the pick table and are dropped).
 */
export function surveyToPickTable(survey: Survey): string {
  const lines: string[] = [];
  if (survey.name !== undefined) lines.push(`# name: ${oneLine(survey.name)}`);
  if (survey.date !== undefined) lines.push(`# date: ${oneLine(survey.date)}`);
  lines.push(PICK_TABLE_COLUMNS.join(','));
  const num = (v: number | null | undefined): string => (v === null || v === undefined ? '' : String(v));
  for (const shot of survey.shots) {
    survey.geophones.forEach((g, i) => {
      lines.push([csvField(shot.id), num(shot.x), num(shot.elevation), num(g.x), num(g.elevation), num(shot.times[i])].join(','));
    });
  }
  return `${lines.join('\n')}\n`;
}
