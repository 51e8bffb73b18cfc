/**
 * The read-only page behind a share link: line name, the cautions (first, where nobody
 * misses them), the depth section and the time–distance plot as inline SVG, the methods
 * compared behind a disclosure (an image loaded when opened), warnings, the station table
 * and a link to its CSV. Server-rendered, no script at all; every piece
 * of user text goes through escapeHtml. The page's Content-Security-Policy (SHARE_PAGE_CSP)
 * forbids scripts, so even a hostile string that slipped through could not run.
 */
import type { Interpretation, Station } from '../engine/output/interpretation.js';
import type { Survey } from '../engine/survey/survey.js';
// The page's own column list (plain ES with JSDoc types, served to the browser as it is), so
// the share page shows the same columns, units and decimals as the page and stations.csv.
import { cellText, columnHeading, stationColumns, type StationColumn } from '../web/station-columns.js';
import { metres, refractorDepthRanges, velocity } from '../web/describe.js';
import { hiddenLayerNote, otherWarnings } from '../web/hidden-layer-note.js';
import { surveyDateText } from '../engine/render/describe.js';
import { PAGE } from '../engine/render/page.js';

export const SHARE_PAGE_CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

const HTML_ESCAPES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

export function escapeHtml(text: unknown): string {
  return String(text ?? '').replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]);
}

/**
 * Drops an XML declaration or doctype so the SVG can sit inside HTML. With `idPrefix`, the
 * drawing's own ids (clip path, hatch: "arcline-…") and the references to them get that
 * prefix: ids are document-wide in HTML, and every sheet of a paged section uses the same
 * ones, so without it sheet 2 would be clipped by sheet 1's clip path.
 */
function inlineSvg(svg: string, idPrefix = ''): string {
  const bare = svg.replace(/^\s*<\?xml[^>]*\?>\s*/i, '').replace(/^\s*<!DOCTYPE[^>]*>\s*/i, '');
  return idPrefix === '' ? bare : bare.replace(/(id="|url\(#|href="#)arcline-/g, `$1${idPrefix}arcline-`);
}

/**
 * The depth section: one figure, or on a line paged over several sheets a line naming how
 * many, links to each, and every sheet as its own figure ("sheet k of n"), in order along the
 * line (no script on this page, so every sheet is on it rather than behind a chooser).
 */
function sectionFigures(sheets: readonly string[]): string {
  if (sheets.length <= 1) {
    return `<figure class="section-sheet" id="section-sheet-1">
<figcaption>Depth section</figcaption>
${inlineSvg(sheets[0] ?? '')}
</figure>`;
  }
  const n = sheets.length;
  const links = sheets.map((_, i) => `<a href="#section-sheet-${i + 1}">sheet ${i + 1} of ${n}</a>`).join(' · ');
  const figures = sheets.map(
    (svg, i) => `<figure class="section-sheet" id="section-sheet-${i + 1}">
<figcaption>Depth section — sheet ${i + 1} of ${n}</figcaption>
${inlineSvg(svg, `s${i + 1}-`)}
</figure>`,
  );
  return `<p class="sheets-note">This line is drawn on ${n} sheets at one scale; they meet at match lines. All ${n} follow: ${links}.</p>
${figures.join('\n')}`;
}

/**
 * A stored timestamp in words, e.g. "5 December 2026, 06:07 CET": the page has no script to
 * learn the reader's time zone, so the service's own zone is used and named.
 */
export function readableTime(iso: string, timeZone?: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return new Intl.DateTimeFormat('en-GB', {
    day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit', hour12: false, timeZoneName: 'short',
    ...(timeZone ? { timeZone } : {}),
  }).format(date);
}

/**
 * The survey's free-text date line (site, date of shooting, crew): a bare ISO date
 * ("2024-05-14") in words ("shot on 14 May 2024"), anything else as the survey gives it; the
 * drawings' title blocks say the same (engine/render/describe.ts, surveyDateText).
 */
export function readableSurveyDate(text: string): string {
  return surveyDateText(text);
}

/** Words (coverage) read from the left, numbers from the right, as on the page. */
function alignClass(c: StationColumn): string {
  return c.decimals === null ? ' class="text"' : '';
}

function stationRow(columns: readonly StationColumn[], s: Station): string {
  return `<tr>${columns.map((c) => `<td${alignClass(c)}>${escapeHtml(cellText(c, s))}</td>`).join('')}</tr>`;
}

function stationHead(columns: readonly StationColumn[]): string {
  return `<tr>${columns.map((c) => `<th scope="col"${alignClass(c)} data-column="${escapeHtml(c.key)}">${escapeHtml(columnHeading(c))}</th>`).join('')}</tr>`;
}

export interface SharePageInput {
  survey: Survey;
  interpretation: Interpretation;
  name: string;
  revision: number;
  storedAt: string;
  /** IANA time zone for the stored time (tests fix it); the service's own zone by default. */
  timeZone?: string;
  /** Every sheet of the depth section, in order (one for a line that fits a sheet). */
  sectionSheets: readonly string[];
  travelTimesSvg: string;
  cautions: readonly string[];
  stationsCsvUrl: string;
  /**
   * Where this shared line's files live ("…/share/TOKEN/"): the drawings' PDF and PNG files
   * and methods.svg. Absent: no download links and no "Methods compared" figure.
   */
  drawingFilesUrl?: string;
}

const PAGE_STYLE = `
body{font-family:system-ui,sans-serif;margin:0 auto;max-width:1100px;padding:1rem 1.5rem;color:#1b1b1b;background:#fff}
h1{font-size:1.5rem;margin:.2rem 0}
h2{font-size:1.1rem}
.meta{color:#555;margin:0 0 .6rem}
.cautions{border:2px solid #b35806;background:#fff4e5;padding:.5rem 1rem;margin:.6rem 0;font-size:.9rem}
.cautions h2{font-size:.95rem;margin:.2rem 0 .3rem;color:#7a3b00}
.cautions p{margin:.25rem 0}
.summary{display:grid;grid-template-columns:max-content 1fr;gap:.2rem 1rem;margin:.6rem 0}
.summary dt{color:#555}
.summary dd{margin:0}
.allowance{border-left:4px solid #5b7a99;background:#eef3f8;padding:.5rem 1rem;margin:.6rem 0}
.allowance p{margin:.2rem 0}
.allowance h2{font-size:1rem;margin:.1rem 0 .3rem}
.allowance .why{color:#444;font-size:.85rem}
.sheets-note{margin:.8rem 0 0;font-weight:600}
figure{margin:1rem 0}
figure svg{max-width:100%;height:auto;border:1px solid #ddd}
figcaption{font-weight:600;margin-bottom:.3rem}
.methods{border:1px solid #ccc;padding:.4rem .8rem;margin:1rem 0}
.methods summary{font-weight:600;cursor:pointer}
.methods .why{color:#444;font-size:.85rem;margin:.3rem 0}
.methods img{display:block;width:100%;height:auto;border:1px solid #ddd}
table{border-collapse:collapse;font-variant-numeric:tabular-nums;font-size:.9rem}
th,td{border:1px solid #ccc;padding:.2rem .5rem;text-align:right}
td{white-space:nowrap}
.text{text-align:left}
.table-wrap{overflow-x:auto}
th{background:#f2f2f2}
.warnings li{margin:.2rem 0}
footer{margin-top:2rem;color:#666;font-size:.85rem}
@media print{
  @page{size:A4 landscape;margin:12mm}
  body{max-width:none;padding:0;font-size:10pt}
  a[download]{display:none}
  .cautions,.allowance{break-inside:avoid}
  figure{break-inside:avoid;page-break-inside:avoid}
  .sheets-note a{color:inherit;text-decoration:none}
  figure svg{width:100%;max-height:170mm;border:none}
  .methods{border:none;padding:0}
  .methods img{max-height:170mm;width:auto;max-width:100%;border:none}
  .table-wrap{overflow:visible}
  table{width:100%;font-size:8pt}
  th,td{padding:1px 4px}
  thead{display:table-header-group}
  tr{break-inside:avoid}
}
`;

/** The hidden-layer allowance in calm words (web/hidden-layer-note.js), or ''. */
function allowanceSection(interpretation: Interpretation): string {
  const note = hiddenLayerNote(interpretation);
  if (!note) return '';
  return `<section class="allowance" aria-labelledby="allowance-heading">
<h2 id="allowance-heading">Hidden-layer allowance</h2>
<p>${escapeHtml(note.headline)}</p>
<p>${escapeHtml(note.detail)}</p>
<p class="why">${escapeHtml(note.reasoning)}</p>
</section>`;
}

/**
 * The refractor by every method, behind a disclosure: the page has no script, so the figure
 * is an <img> of …/methods.svg (img-src 'self' in SHARE_PAGE_CSP) that the browser fetches
 * lazily, only once the reader opens it, since drawing it interprets the line twice more.
 * The image's size is the drawing's page, so the layout does not jump when it arrives.
 */
function methodsDisclosure(filesUrl: string): string {
  const url = escapeHtml(filesUrl);
  return `<details class="methods" id="methods-compared">
<summary>Methods compared — the first refractor by plus-minus, GRM and time terms (drawn when opened)</summary>
<p class="why">A cross-check: the three methods read the same picks with the same velocities and differ only in their delay times. Where two differ by more than their combined 1σ, the section is less certain than any one of them says.</p>
<figure>
<img src="${url}methods.svg" loading="lazy" width="${PAGE.widthMm * 4}" height="${PAGE.heightMm * 4}" alt="The first refractor of this line by plus-minus (solid), GRM (dashed) and time terms (dotted) on one section, the difference of each from plus-minus below it, the stretches where they differ by more than their combined 1σ, and the cautions.">
<figcaption>Methods compared · <a href="${url}methods.svg" download>SVG</a> · <a href="${url}methods.pdf" download>PDF</a> · <a href="${url}methods.png" download>PNG</a></figcaption>
</figure>
</details>`;
}

/** Layer velocities and the depth range to every refractor, as on the page. */
function summaryList(interpretation: Interpretation): string {
  const layers = interpretation.layers ?? [];
  const items: [string, string][] = [];
  if (layers.length) items.push(['Layer velocities', layers.map((l, i) => `layer ${i + 1}: ${velocity(l.velocity)} m/s`).join(' · ')]);
  for (const range of refractorDepthRanges(interpretation.stations)) items.push([range.label, range.text]);
  return `<dl class="summary">${items.map(([t, d]) => `<dt>${escapeHtml(t)}</dt><dd>${escapeHtml(d)}</dd>`).join('')}</dl>`;
}

export function renderSharePage(input: SharePageInput): string {
  const { interpretation } = input;
  const columns = stationColumns(interpretation.stations);
  const warnings = otherWarnings(interpretation.qc?.warnings);
  const surveyDate = input.survey.date ? ` · ${escapeHtml(readableSurveyDate(input.survey.date))}` : '';
  const stored = `<time datetime="${escapeHtml(input.storedAt)}">${escapeHtml(readableTime(input.storedAt, input.timeZone))}</time>`;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="referrer" content="no-referrer">
<meta name="robots" content="noindex, nofollow">
<title>${escapeHtml(input.name)} — Arcline section</title>
<style>${PAGE_STYLE}</style>
</head>
<body>
<header>
<h1>${escapeHtml(input.name)}</h1>
<p class="meta">Read-only copy of revision ${escapeHtml(input.revision)}, stored ${stored}${surveyDate} · method ${escapeHtml(interpretation.method ?? 'plus-minus')}</p>
</header>
<section class="cautions" aria-label="Cautions">
<h2>Read before using these depths</h2>
${input.cautions.map((c) => `<p>${escapeHtml(c)}</p>`).join('\n')}
</section>
${summaryList(interpretation)}
${sectionFigures(input.sectionSheets)}
<figure>
<figcaption>Time–distance plot</figcaption>
${inlineSvg(input.travelTimesSvg)}
</figure>
${input.drawingFilesUrl === undefined ? '' : methodsDisclosure(input.drawingFilesUrl)}
${allowanceSection(interpretation)}
<section aria-label="Warnings">
<h2>Warnings</h2>
${
  warnings.length === 0
    ? '<p>None.</p>'
    : `<ul class="warnings">${warnings
        .map((w) => `<li>${escapeHtml(w.message)}${typeof w.x === 'number' && !/x\s*=/.test(w.message) ? ` (at x = ${escapeHtml(metres(w.x))} m)` : ''}</li>`)
        .join('')}</ul>`
}
</section>
<section aria-label="Stations">
<h2>Stations</h2>
<p><a href="${escapeHtml(input.stationsCsvUrl)}" download>Download the station table (CSV)</a></p>${
  input.drawingFilesUrl === undefined
    ? ''
    : `
<p class="drawing-files">Download the drawings: depth section <a href="${escapeHtml(input.drawingFilesUrl)}section.pdf" download>PDF</a> · <a href="${escapeHtml(input.drawingFilesUrl)}section.png" download>PNG</a>; time–distance plot <a href="${escapeHtml(input.drawingFilesUrl)}traveltimes.pdf" download>PDF</a> · <a href="${escapeHtml(input.drawingFilesUrl)}traveltimes.png" download>PNG</a> (A4 landscape; a long line is one PDF page per sheet).</p>`
}
<div class="table-wrap">
<table>
<thead>${stationHead(columns)}</thead>
<tbody>
${interpretation.stations.map((s) => stationRow(columns, s)).join('\n')}
</tbody>
</table>
</div>
</section>
<footer>Shared from Arcline. This page cannot change anything; ask the sender for a new link if it stops working.</footer>
</body>
</html>
`;
}
