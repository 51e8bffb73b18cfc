/**
 * The read-only page behind a share link: line name, the cautions (first, where nobody
 * misses them), the depth section and the time–distance plot as inline SVG, warnings,
 * the station table and a link to its CSV. Server-rendered, no script at all; every piece
 * of user text goes through escapeHtml. The page's Content-Security-Policy (SHARE_PAGE_CSP)
 * forbids scripts, so even a hostile string that slipped through could not run.
 */
import type { Interpretation, Station } from '../engine/output/interpretation.js';
import type { Survey } from '../engine/survey/survey.js';
// The page's own column list (plain ES with JSDoc types, served to the browser as it is), so
// the share page shows the same columns, units and decimals as the page and stations.csv.
import { cellText, columnHeading, stationColumns, type StationColumn } from '../web/station-columns.js';

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

/** Drops an XML declaration or doctype so the SVG can sit inside HTML. */
function inlineSvg(svg: string): string {
  return svg.replace(/^\s*<\?xml[^>]*\?>\s*/i, '').replace(/^\s*<!DOCTYPE[^>]*>\s*/i, '');
}

function num(value: number | null | undefined, digits: number): string {
  return typeof value === 'number' && Number.isFinite(value) ? value.toFixed(digits) : '–';
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
  sectionSvg: string;
  travelTimesSvg: string;
  cautions: readonly string[];
  stationsCsvUrl: string;
}

const PAGE_STYLE = `
body{font-family:system-ui,sans-serif;margin:0 auto;max-width:1100px;padding:1rem 1.5rem;color:#1b1b1b;background:#fff}
h1{font-size:1.5rem;margin:.2rem 0}
.meta{color:#555;margin:0 0 1rem}
.cautions{border:2px solid #b35806;background:#fff4e5;padding:.6rem 1rem;margin:1rem 0}
.cautions h2{font-size:1rem;margin:.2rem 0 .4rem;color:#7a3b00}
.cautions p{margin:.3rem 0}
figure{margin:1rem 0}
figure svg{max-width:100%;height:auto;border:1px solid #ddd}
figcaption{font-weight:600;margin-bottom:.3rem}
table{border-collapse:collapse;font-variant-numeric:tabular-nums;font-size:.9rem}
th,td{border:1px solid #ccc;padding:.2rem .5rem;text-align:right}
td{white-space:nowrap}
.text{text-align:left}
.table-wrap{overflow-x:auto}
th{background:#f2f2f2}
.warnings li{margin:.2rem 0}
footer{margin-top:2rem;color:#666;font-size:.85rem}
`;

export function renderSharePage(input: SharePageInput): string {
  const { interpretation } = input;
  const columns = stationColumns(interpretation.stations);
  const warnings = interpretation.qc?.warnings ?? [];
  const layers = interpretation.layers ?? [];
  const layerText = layers.map((l, i) => `layer ${i + 1}: ${num(l.velocity, 0)} m/s`).join(', ');
  const dateLine = input.survey.date ? ` · ${escapeHtml(input.survey.date)}` : '';
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
<p class="meta">Read-only copy of revision ${escapeHtml(input.revision)}, stored ${escapeHtml(input.storedAt)}${dateLine} · method ${escapeHtml(interpretation.method ?? 'plus-minus')}${layerText ? ` · ${escapeHtml(layerText)}` : ''}</p>
</header>
<section class="cautions" aria-label="Cautions">
<h2>Read before using these depths</h2>
${input.cautions.map((c) => `<p>${escapeHtml(c)}</p>`).join('\n')}
</section>
<figure>
<figcaption>Depth section</figcaption>
${inlineSvg(input.sectionSvg)}
</figure>
<figure>
<figcaption>Time–distance plot</figcaption>
${inlineSvg(input.travelTimesSvg)}
</figure>
<section aria-label="Warnings">
<h2>Warnings</h2>
${
  warnings.length === 0
    ? '<p>None.</p>'
    : `<ul class="warnings">${warnings
        .map((w) => `<li><strong>${escapeHtml(w.code)}</strong>${typeof w.x === 'number' ? ` at x = ${escapeHtml(num(w.x, 1))} m` : ''}: ${escapeHtml(w.message)}</li>`)
        .join('')}</ul>`
}
</section>
<section aria-label="Stations">
<h2>Stations</h2>
<p><a href="${escapeHtml(input.stationsCsvUrl)}" download>Download the station table (CSV)</a></p>
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
