/**
 * The depth section, as sheets at a stated drawing scale: distance along the line against
 * elevation, composed from the small drawing functions of this folder. A line too long for
 * one sheet at the scale is paged over several sheets that meet at match lines.
 *
 * It draws what the interpretation says and derives nothing new: depths, uncertainties,
 * velocities, steps and dip all come from the Interpretation. The one sum it does —
 * elevation of the second refractor = station elevation − depths[1] — is the definition the
 * API states for refractorElevation, applied to the deeper refractor.
 *
 * Cost: O(S + G) to prepare and O(S_k + G) per sheet k (stations in its window, plus the
 * label rows' walk over the geophones); O(S + N·G) for N sheets.
 */
import type { G, Svg } from '@svgdotjs/svg.js';
import type { Survey } from '../survey/survey.js';
import type { Interpretation, Station } from '../output/interpretation.js';
import { CAUTIONS } from '../qc/cautions.js';
import { createCanvas } from './svg-document.js';
import { PAPER, TEXT_MM, type PageSize } from './page.js';
import { INK, SECTION_COLOURS } from './palette.js';
import { layerCountNotes, titleBlock, titleBlockBottomMm, titleLeftWidthMm, REMARK_MM } from './title-block.js';
import { cautionNote, cautionNoteHeightMm } from './caution-note.js';
import { legend, legendHeightMm } from './legend.js';
import { bottomAxis, leftAxis } from './axis.js';
import { formatExaggeration, type SectionFrame } from './section-frame.js';
import { linearScale } from './scale.js';
import { profileRuns, refractorPath, elevationOnProfile, type ProfilePoint } from './refractor-path.js';
import { topLayerFill, lowerLayerFill, uncoveredStretches, defineHatch, noCoverageHatch, depthArcs, CLIP_ID } from './section-layers.js';
import { groundLine, geophoneMarkers, shotMarkers, type ShotPlacement } from './section-markers.js';
import { stepMarkers, velocityChangeMarkers, layerLabel } from './section-features.js';
import { LabelPlacer } from './label-placer.js';
import { fixed, formatMs, formatVelocity, groupThousands, round3 } from './format.js';
import { addText, wrapText } from './text.js';
import { describeInterpretationMethod, lineName, shotPlacements, surveyDateText } from './describe.js';
import { parseSectionSheetOptions, SectionSheetError, type ResolvedSheetOptions, type SectionSheetOptions } from './sheet-options.js';
import { planSheets, type SheetPlan, type SheetWindow } from './sheet-plan.js';
import { drawSourceRuns, sourceRuns, stationSource, uncertaintyBand, uncertaintyRange } from './refractor-sources.js';
import { depthLabel, labelInterval, ROW_COLOURS, ROW_MM, stationRows, widestRowLabelMm, type StationRow } from './station-rows.js';
import { horizontalScaleBar, verticalScaleBar } from './scale-bar.js';
import { sectionLegend, HIDDEN_LIMIT_DASH, MATCH_LINE_DASH, type SectionLegendNeeds } from './section-legend.js';
import { warningSummary } from './warning-summary.js';

export type { SectionSheetOptions } from './sheet-options.js';
/** Options of renderSection: the same as the sheets'. */
export type SectionOptions = SectionSheetOptions;

/** Left of the plot: row captions and the elevation axis, mm. */
const PLOT_LEFT_MM = 32;
/** Below the plot: the chainage axis's ticks, numbers and title, mm. */
const AXIS_ZONE_MM = 10;
/** Room a shot's star and name need either side of it, mm. */
const SHOT_CLEAR_MM = 5;
/** Below the rows: the scale bars and the stated scale, mm. */
const SCALE_ZONE_MM = 10;

/** Everything about the line the sheets share. */
interface SectionContent {
  name: string;
  stations: readonly Station[];
  geophones: ProfilePoint[];
  geophoneXs: number[];
  shots: ShotPlacement[];
  ground: ProfilePoint[];
  hasSecond: boolean;
  hiddenLimit: ProfilePoint[][];
  refractor: ProfilePoint[][];
  refractor2: ProfilePoint[][];
  cautions: readonly string[];
  needs: SectionLegendNeeds;
  rows: StationRow[];
  extent: { fromM: number; toM: number; spreadFromM: number; spreadToM: number; topM: number; bottomM: number };
}

/**
 * The depth section as one SVG document per sheet, all at the same horizontal scale and
 * vertical exaggeration. Throws SectionSheetError (naming the option and why) for options it
 * cannot draw: a bad value, a height that does not fit the paper, too many sheets.
 */
export function renderSectionSheets(survey: Survey, interpretation: Interpretation, options: SectionSheetOptions = {}): string[] {
  return drawSheets(survey, interpretation, options, null).svgs;
}

/** The first sheet of the depth section (the whole section when the line fits one sheet); only that sheet is drawn. */
export function renderSection(survey: Survey, interpretation: Interpretation, options: SectionOptions = {}): string {
  return drawSheets(survey, interpretation, options, 0).svgs[0];
}

/**
 * Sheet `sheet` (1-based) of the depth section and how many sheets the section has at these
 * options; only that sheet is drawn (the page shows a long line sheet by sheet). `svg` is
 * null when the section has fewer sheets than `sheet`.
 */
export function renderSectionSheet(survey: Survey, interpretation: Interpretation, sheet: number, options: SectionSheetOptions = {}): { svg: string | null; sheetCount: number } {
  const drawn = drawSheets(survey, interpretation, options, Number.isInteger(sheet) && sheet >= 1 ? sheet - 1 : -1);
  return { svg: drawn.svgs[0] ?? null, sheetCount: drawn.sheetCount };
}

/** How many sheets the depth section has at these options; plans the sheets and draws none. */
export function sectionSheetCount(survey: Survey, interpretation: Interpretation, options: SectionSheetOptions = {}): number {
  return drawSheets(survey, interpretation, options, -1).sheetCount;
}

/** Plans the sheets and draws all of them, or only sheet `only` (0-based; none when out of range). */
function drawSheets(survey: Survey, interpretation: Interpretation, options: SectionSheetOptions, only: number | null): { svgs: string[]; sheetCount: number } {
  const parsed = parseSectionSheetOptions(options);
  if (parsed.problems.length > 0) throw new SectionSheetError(parsed.problems);
  const resolved = parsed.options;
  const page = PAPER[resolved.paper];
  const content = sectionContent(survey, interpretation, resolved);

  // The layout depends on the legend (match lines appear only when paged), so plan twice at most.
  let layout = sheetLayout(page, content, survey, interpretation, false);
  let planned = planSheets({ ...content.extent, geophoneXs: content.geophoneXs }, layout.room, resolved);
  if ('plan' in planned && planned.plan.windows.length > 1) {
    layout = sheetLayout(page, content, survey, interpretation, true);
    planned = planSheets({ ...content.extent, geophoneXs: content.geophoneXs }, layout.room, resolved);
  }
  if ('problems' in planned) throw new SectionSheetError(planned.problems);
  const plan = planned.plan;
  const texts = content.rows.flatMap((r) => (r.kind === 'labels' ? r.texts : []));
  const interval = labelInterval(content.geophoneXs, plan.mmPerM, widestRowLabelMm(texts));
  const draw = (window: SheetWindow, k: number) => drawSheet({ survey, interpretation, content, plan, layout, page, window, k, interval });
  const sheetCount = plan.windows.length;
  if (only === null) return { svgs: plan.windows.map(draw), sheetCount };
  return { svgs: only >= 0 && only < sheetCount ? [draw(plan.windows[only], only)] : [], sheetCount };
}

function sectionContent(survey: Survey, interpretation: Interpretation, options: ResolvedSheetOptions): SectionContent {
  const stations: readonly Station[] = interpretation.stations ?? [];
  const shots = shotPlacements(survey, interpretation);
  const geophones: ProfilePoint[] = survey.geophones.map((g) => ({ x: g.x, elevation: g.elevation ?? 0 }));
  const geophoneXs = geophones.map((g) => g.x);
  const refractor = profileRuns(stations, (s) => s.x, (s) => s.refractorElevation);
  const hasSecond = stations.some((s) => s.depths?.[1] !== null && s.depths?.[1] !== undefined);
  const refractor2 = hasSecond ? profileRuns(stations, (s) => s.x, (s) => secondElevation(s)) : [];
  // Where the hidden-layer warning is given: the deepest the refractor could lie (qc).
  const hiddenLimit = profileRuns(stations, (s) => s.x, (s) => (typeof s.hiddenLayerDepth === 'number' ? s.elevation - s.hiddenLayerDepth : null));
  const firstX = geophones.length > 0 ? geophones[0].x : 0;
  const lastX = geophones.length > 0 ? geophones[geophones.length - 1].x : 0;
  const offEnd = shots.filter((s) => s.x < firstX || s.x > lastX).map((s) => ({ x: s.x, elevation: s.elevation }));
  const ground = [...geophones, ...offEnd].sort((a, b) => a.x - b.x);

  const allXs = [...geophoneXs, ...shots.map((s) => s.x)];
  const fromM = allXs.length > 0 ? Math.min(...allXs) : 0;
  const toM = allXs.length > 0 ? Math.max(...allXs) : 1;
  const topM = Math.max(...ground.map((p) => p.elevation), ...shots.map((s) => s.elevation), -Infinity);
  const bandLow = stations.map((s) => (s.refractorElevation !== null && typeof s.depthUncertainty === 'number' && Number.isFinite(s.depthUncertainty) ? s.refractorElevation - s.depthUncertainty : null)).filter((v): v is number => v !== null && Number.isFinite(v));
  const lows = [...[...refractor, ...refractor2, ...hiddenLimit].flat().map((p) => p.elevation), ...bandLow];
  const groundMin = Math.min(...ground.map((p) => p.elevation), Infinity);
  const groundTop = Number.isFinite(topM) ? topM : 0;
  const bottomM = lows.length > 0 ? Math.min(...lows) : (Number.isFinite(groundMin) ? groundMin : 0) - 0.15 * Math.max(1, toM - fromM);

  const sources = stations.map((s) => stationSource(s, 0));
  const sources2 = hasSecond ? stations.map((s) => stationSource(s, 1)) : [];
  const needs: SectionLegendNeeds = {
    hasSecond,
    oneSided: [...sources, ...sources2].includes('one-sided'),
    interpolated: [...sources, ...sources2].includes('interpolated'),
    band: uncertaintyRange(stations) !== null,
    hiddenLimit: hiddenLimit.length > 0,
    arcs: options.showArcs && stations.some((s) => typeof s.normalDepth === 'number' && s.normalDepth > 0),
    uncovered: stations.some((s) => s.refractorElevation === null),
    steps: (interpretation.features?.steps ?? []).length > 0,
    changes: (interpretation.features?.velocityChanges ?? []).length > 0,
    matchLines: false,
    depthMarks: false,
  };

  const rows: StationRow[] = [{ kind: 'labels', caption: 'geophone', role: 'geophone-row', texts: geophones.map((_, i) => String(i + 1)) }];
  const depthTexts = survey.geophones.map((_, i) => (stations[i] ? depthLabel(stations[i], 0) : '–'));
  rows.push({ kind: 'labels', caption: hasSecond ? 'depth 1 (m)' : 'depth (m)', role: 'depth-row', texts: depthTexts });
  const depth2Texts = hasSecond ? survey.geophones.map((_, i) => (stations[i] ? depthLabel(stations[i], 1) : '–')) : [];
  if (hasSecond) rows.push({ kind: 'labels', caption: 'depth 2 (m)', role: 'depth-2-row', texts: depth2Texts });
  needs.depthMarks = [...depthTexts, ...depth2Texts].some((t) => /^[(~–]/.test(t));
  const segments = interpretation.refractorVelocity ?? [];
  const layer2 = interpretation.layers?.[1]?.velocity;
  if (segments.length > 0) {
    rows.push({ kind: 'bars', caption: hasSecond ? 'V refractor 1' : 'V refractor', role: 'refractor-velocity', segments, colour: ROW_COLOURS.first });
  } else if (typeof layer2 === 'number' && Number.isFinite(layer2)) {
    // No velocity along the line: the layer's one mean velocity over the covered stretches.
    const spans = refractor.filter((run) => run.length >= 2).map((run) => ({ from: run[0].x, to: run[run.length - 1].x, velocity: layer2 }));
    rows.push({ kind: 'bars', caption: hasSecond ? 'V refractor 1 (mean)' : 'V refractor (mean)', role: 'refractor-velocity', segments: spans, colour: ROW_COLOURS.first });
  }
  const layer3 = interpretation.layers?.[2]?.velocity;
  if (hasSecond && typeof layer3 === 'number' && Number.isFinite(layer3)) {
    const spans = refractor2.filter((run) => run.length >= 2).map((run) => ({ from: run[0].x, to: run[run.length - 1].x, velocity: layer3 }));
    rows.push({ kind: 'bars', caption: 'V refractor 2', role: 'refractor-2-velocity', segments: spans, colour: ROW_COLOURS.second });
  }

  return {
    name: lineName(survey, interpretation),
    stations,
    geophones,
    geophoneXs,
    shots,
    ground,
    hasSecond,
    hiddenLimit,
    refractor,
    refractor2,
    cautions: interpretation.cautions && interpretation.cautions.length > 0 ? interpretation.cautions : CAUTIONS,
    needs,
    rows,
    extent: { fromM, toM: Math.max(toM, fromM + 1), spreadFromM: geophoneXs.length > 1 ? firstX : fromM, spreadToM: geophoneXs.length > 1 ? Math.max(lastX, firstX + 1) : Math.max(toM, fromM + 1), topM: groundTop, bottomM: Math.min(bottomM, groundTop - 0.5) },
  };
}

function secondElevation(s: Station): number | null {
  const d = s.depths?.[1];
  return d === null || d === undefined ? null : s.elevation - d;
}

interface SheetLayout {
  titleContent: Parameters<typeof titleBlock>[1];
  plotTop: number;
  plotBottom: number;
  rowsTop: number;
  scaleTop: number;
  legendTop: number;
  cautionTop: number;
  legendItems: ReturnType<typeof sectionLegend>;
  room: { widthMm: number; heightMm: number };
}

/** Title-block notes for a plan (or, before planning, with the widest texts they can have). */
function titleNotes(survey: Survey, interpretation: Interpretation, plan: SheetPlan | null, paper: string) {
  const scaleText = plan ? `1:${groupThousands(plan.scale)}` : '1:1,000,000';
  const verticalText = plan ? `1:${groupThousands(plan.scale / plan.verticalExaggeration)}` : '1:1,000,000';
  const notes: { text: string; role: string; alert?: boolean }[] = [
    { text: `scale ${scaleText} at ${paper} landscape · vertical ${verticalText}`, role: 'drawing-scale' },
    { text: `vertical exaggeration ${plan ? formatExaggeration(plan.verticalExaggeration) : '10:1'}`, role: 'vertical-exaggeration' },
  ];
  const lowerDip = interpretation.features?.lowerRefractor;
  if (lowerDip) {
    notes.push({ text: dipText(interpretation.features?.dip, 'first refractor'), role: 'dip' }, { text: dipText(lowerDip.dip, 'second refractor'), role: 'dip-2' });
  } else {
    notes.push({ text: dipText(interpretation.features?.dip, 'refractor'), role: 'dip' });
  }
  notes.push(...layerCountNotes(interpretation, survey.options?.layers));
  const residuals = interpretation.qc?.residuals;
  if (residuals && Number.isFinite(residuals.rmsMs)) notes.push({ text: `picks vs model RMS ${formatMs(residuals.rmsMs)}`, role: 'qc-summary' });
  const failed = (interpretation.qc?.reciprocal ?? []).filter((r) => !r.ok);
  if (failed.length > 0) {
    const worst = failed.reduce((a, b) => (Math.abs(b.differenceMs) > Math.abs(a.differenceMs) ? b : a));
    notes.push({ text: `reciprocal check failed (${failed.length}): ${worst.shots[0]}/${worst.shots[1]} Δ ${formatMs(Math.abs(worst.differenceMs))}`, role: 'reciprocal-alert', alert: true });
  }
  return notes;
}

function ordinal(n: number): string {
  const tens = n % 100;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : n % 10 === 1 ? 'st' : n % 10 === 2 ? 'nd' : n % 10 === 3 ? 'rd' : 'th';
  return `${n}${suffix}`;
}

/** Where everything goes on a sheet, top down; depends on counts of lines, not on the plan. */
function sheetLayout(page: PageSize, content: SectionContent, survey: Survey, interpretation: Interpretation, paged: boolean): SheetLayout {
  const contentWidth = page.widthMm - 2 * page.marginMm;
  const notes = titleNotes(survey, interpretation, null, 'A4');
  const subtitle = sectionSubtitle(survey, interpretation, paged ? 'sheet 10 of 10' : null);
  const leftWidth = titleLeftWidthMm({ notes, page });
  const remarks = wrapText(warningSummary(interpretation.qc?.warnings ?? []), leftWidth, REMARK_MM).map((text) => ({ text, role: 'warning-summary' }));
  const titleContent = { title: content.name, subtitle, dateLine: survey.date === undefined ? undefined : surveyDateText(survey.date), notes, remarks, page };
  const range = uncertaintyRange(content.stations);
  const legendItems = sectionLegend({ ...content.needs, matchLines: paged }, range);
  const cautionTop = page.heightMm - page.marginMm + 1 - cautionNoteHeightMm(content.cautions, contentWidth);
  const legendTop = cautionTop - 2 - legendHeightMm(legendItems, contentWidth);
  const scaleTop = legendTop - SCALE_ZONE_MM;
  const rowsTop = scaleTop - content.rows.length * ROW_MM - 1;
  const plotBottom = rowsTop - AXIS_ZONE_MM;
  const plotTop = titleBlockBottomMm(titleContent) + 3;
  return {
    titleContent,
    plotTop,
    plotBottom,
    rowsTop,
    scaleTop,
    legendTop,
    cautionTop,
    legendItems,
    room: { widthMm: page.widthMm - page.marginMm - 1 - PLOT_LEFT_MM, heightMm: Math.max(10, plotBottom - plotTop) },
  };
}

function sectionSubtitle(survey: Survey, interpretation: Interpretation, sheet: string | null): string {
  return ['Depth section', describeInterpretationMethod(interpretation), `${survey.geophones.length} geophones`, `${survey.shots.length} shots`, sheet ?? '']
    .filter((part) => part.length > 0)
    .join(' · ');
}

interface SheetJob {
  survey: Survey;
  interpretation: Interpretation;
  content: SectionContent;
  plan: SheetPlan;
  layout: SheetLayout;
  page: PageSize;
  window: SheetWindow;
  k: number;
  interval: number;
}

function chainage(x: number): string {
  return `${Math.abs(x - Math.round(x)) < 0.05 ? groupThousands(x) : fixed(x, 1)} m`;
}

/** Stations of the window and one beyond each edge, so lines run on to the clip. O(S). */
function stationsAround(stations: readonly Station[], window: SheetWindow): Station[] {
  let first = stations.findIndex((s) => s.x >= window.fromM);
  if (first < 0) first = stations.length;
  let last = first - 1;
  while (last + 1 < stations.length && stations[last + 1].x <= window.toM) last++;
  return stations.slice(Math.max(0, first - 1), Math.min(stations.length, last + 2));
}

function drawSheet(job: SheetJob): string {
  const { survey, interpretation, content, plan, layout, page, window, k, interval } = job;
  const count = plan.windows.length;
  const sheetWords = count > 1 ? `sheet ${k + 1} of ${count}` : null;
  const canvas = createCanvas(`Depth section — ${content.name}${sheetWords ? ` — ${sheetWords}` : ''}`, page);
  const svg = canvas.svg;
  const notes = titleNotes(survey, interpretation, plan, plan.paper);
  titleBlock(svg, { ...layout.titleContent, notes, subtitle: sectionSubtitle(survey, interpretation, sheetWords) });

  const plotX0 = PLOT_LEFT_MM;
  const plotX1 = plotX0 + (window.toM - window.fromM) * plan.mmPerM;
  const plotY0 = layout.plotTop;
  const plotY1 = Math.min(layout.plotBottom, plotY0 + plan.plotHeightMm);
  // What sits under the plot (station rows, scale bars, legend) moves up with its bottom;
  // the cautions stay at the foot of the sheet.
  const rise = layout.plotBottom - plotY1;
  const frame: SectionFrame = {
    x: linearScale([window.fromM, window.toM], [plotX0, plotX1]),
    elevation: linearScale([plan.topElevationM - (plotY1 - plotY0) / plan.verticalMmPerM, plan.topElevationM], [plotY1, plotY0]),
    verticalExaggeration: plan.verticalExaggeration,
    plot: { x0: plotX0, y0: plotY0, x1: plotX1, y1: plotY1 },
  };
  // Half-open windows: a geophone or shot on a match line belongs to the sheet after it.
  const last = k === count - 1;
  const inWindow = (x: number) => x >= window.fromM - 1e-9 && (last ? x <= window.toM + 1e-9 : x < window.toM - 1e-9);
  const stations = stationsAround(content.stations, window);
  const refractor = profileRuns(stations, (s) => s.x, (s) => s.refractorElevation);
  const refractor2 = content.hasSecond ? profileRuns(stations, (s) => s.x, secondElevation) : [];
  const hidden = profileRuns(stations, (s) => s.x, (s) => (typeof s.hiddenLayerDepth === 'number' ? s.elevation - s.hiddenLayerDepth : null));

  defineHatch(svg);
  const clip = svg.clip();
  clip.id(CLIP_ID);
  clip.rect(round3(plotX1 - plotX0), round3(plotY1 - plotY0)).attr({ x: round3(plotX0), y: round3(plotY0) });

  const plot = svg.group().attr({ 'data-role': 'section-plot', 'clip-path': `url(#${CLIP_ID})` });
  topLayerFill(plot, refractor, stations, frame);
  lowerLayerFill(plot, refractor, frame, 2, SECTION_COLOURS.layer2Fill);
  if (content.hasSecond) lowerLayerFill(plot, refractor2, frame, 3, SECTION_COLOURS.layer3Fill);
  const hatches = uncoveredStretches(stations).map((stretch) => noCoverageHatch(plot, stretch, frame));
  if (content.needs.arcs) {
    // On long lines the arcs are drawn where values are written, so they do not merge into a mass.
    const labelled = new Set(content.geophoneXs.filter((_, i) => i % interval === 0));
    depthArcs(plot, stations.filter((s) => labelled.has(s.x)), frame);
  }
  if (content.needs.band) uncertaintyBand(plot, stations, frame, SECTION_COLOURS.refractor);
  if (content.hasSecond) drawSourceRuns(plot, sourceRuns(stations, 1, secondElevation), frame, { colour: SECTION_COLOURS.refractor2, widthMm: 0.6, role: 'refractor-2' });
  if (hidden.length > 0) refractorPath(plot, hidden, frame.x, frame.elevation, { colour: SECTION_COLOURS.refractor, widthMm: 0.35, dash: HIDDEN_LIMIT_DASH, role: 'hidden-layer-limit' });
  drawSourceRuns(plot, sourceRuns(stations, 0, (s) => s.refractorElevation), frame, { colour: SECTION_COLOURS.refractor, widthMm: 0.8, role: 'refractor' });
  groundLine(plot, content.ground, frame);
  const geophones = content.geophones.filter((g) => inWindow(g.x));
  geophoneMarkers(svg, geophones, frame);
  // A shot whose star and name would hang over the outer edge of the first or last sheet is
  // named at that edge instead.
  const clearM = SHOT_CLEAR_MM / plan.mmPerM;
  const beforeSheet = (x: number) => k === 0 && x < window.fromM + clearM;
  const afterSheet = (x: number) => last && x > window.toM - clearM;
  const shots = content.shots.filter((s) => inWindow(s.x) && !beforeSheet(s.x) && !afterSheet(s.x));
  shotMarkers(svg, shots, frame, { x0: plotX0, x1: plotX1 });
  offSheetShots(svg, content.shots.filter((s) => beforeSheet(s.x)), frame, 'left');
  offSheetShots(svg, content.shots.filter((s) => afterSheet(s.x)), frame, 'right');

  const placer = new LabelPlacer();
  for (const s of shots) placer.reserve({ x0: frame.x(s.x) - 4, y0: frame.elevation(s.elevation) - 12, x1: frame.x(s.x) + 4, y1: frame.elevation(s.elevation) });
  const features = svg.group().attr('data-role', 'features');
  matchLines(svg, features, frame, plan, k, layout, placer);
  // Labels about the refractor stay off the hatched stretches, where there is no refractor.
  const visibleHatches = hatches
    .map((h) => {
      const x0 = Math.max(h.cx - h.widthMm / 2, plotX0);
      const x1 = Math.min(h.cx + h.widthMm / 2, plotX1);
      return { cx: (x0 + x1) / 2, cy: h.cy, widthMm: x1 - x0 };
    })
    .filter((h) => h.widthMm > 1);
  for (const h of visibleHatches) placer.reserve({ x0: h.cx - h.widthMm / 2, y0: plotY0, x1: h.cx + h.widthMm / 2, y1: plotY1 - 7 });
  stepMarkers(features, (interpretation.features?.steps ?? []).filter((s) => inWindow(s.x)), refractor, frame, placer);
  if (content.hasSecond) stepMarkers(features, (interpretation.features?.lowerRefractor?.steps ?? []).filter((s) => inWindow(s.x)), refractor2, frame, placer, 'rock');
  velocityChangeMarkers(features, (interpretation.features?.velocityChanges ?? []).filter((c) => inWindow(c.x)), refractor, frame, placer);
  for (const h of visibleHatches) {
    const group = features.group().attr('data-role', 'no-coverage-label');
    const rotate = h.widthMm < 22;
    if (h.widthMm < TEXT_MM.label * 1.2) continue;
    addText(group, 'no coverage', h.cx + (rotate ? TEXT_MM.label * 0.35 : 0), h.cy, { sizeMm: TEXT_MM.label, anchor: 'middle', halo: true, fill: INK.muted, italic: true, rotateDeg: rotate ? -90 : 0 });
  }
  drawLayerLabels(features, interpretation, frame, placer, content.ground, refractor, refractor2, content.hasSecond, window);

  // Frame and axes over the fills.
  svg.rect(round3(plotX1 - plotX0), round3(plotY1 - plotY0)).attr({ x: round3(plotX0), y: round3(plotY0), fill: 'none', stroke: INK.frame, 'stroke-width': 0.3, 'data-role': 'plot-frame' });
  bottomAxis(svg, frame.x, { atMm: plotY1, title: 'chainage along the line (m)', maxTicks: Math.max(2, Math.floor((plotX1 - plotX0) / 24)), role: 'x' });
  leftAxis(svg, frame.elevation, { atMm: plotX0, title: 'elevation (m)', maxTicks: Math.max(2, Math.min(9, Math.floor((plotY1 - plotY0) / 9))), role: 'y', titleXMm: page.marginMm + 2.2 });

  stationRows(svg, content.rows, { frame, geophoneXs: content.geophoneXs, interval, fromM: window.fromM, toM: window.toM, lastSheet: last, captionXMm: page.marginMm, topMm: layout.rowsTop - rise });
  scaleBars(svg, plan, layout.scaleTop - rise, interval);
  legend(svg, layout.legendItems, page.marginMm, layout.legendTop - rise + 2, page.widthMm - 2 * page.marginMm);
  cautionNote(svg, content.cautions, page.marginMm, layout.cautionTop, page.widthMm - 2 * page.marginMm);
  return canvas.serialize();
}

/** Match lines at the sheet's paged edges: the chainage and the sheet that continues, on both sheets. */
function matchLines(svg: Svg, features: G, frame: SectionFrame, plan: SheetPlan, k: number, layout: SheetLayout, placer: LabelPlacer): void {
  const count = plan.windows.length;
  const edges: { xMm: number; chainageM: number; other: number; side: 'left' | 'right' }[] = [];
  if (k > 0) edges.push({ xMm: frame.plot.x0, chainageM: plan.windows[k].fromM, other: k, side: 'left' });
  if (k < count - 1) edges.push({ xMm: frame.plot.x1, chainageM: plan.windows[k].toM, other: k + 2, side: 'right' });
  for (const edge of edges) {
    const group = svg.group().attr({ 'data-role': 'match-line', 'data-x': round3(edge.chainageM), 'data-sheet': edge.other });
    group.line(round3(edge.xMm), round3(frame.plot.y0 - 2), round3(edge.xMm), round3(frame.plot.y1)).attr({ stroke: INK.text, 'stroke-width': 0.5, 'stroke-dasharray': MATCH_LINE_DASH });
    const text = edge.side === 'right' ? `match line ${chainage(edge.chainageM)} · continued on sheet ${edge.other}` : `match line ${chainage(edge.chainageM)} · continued from sheet ${edge.other}`;
    const y = frame.plot.y1 - 2;
    const x = edge.side === 'right' ? edge.xMm - 1.2 : edge.xMm + 1.2;
    const width = text.length * TEXT_MM.label * 0.9 * 0.56;
    placer.reserve({ x0: edge.side === 'right' ? x - width : x, y0: y - TEXT_MM.label, x1: edge.side === 'right' ? x : x + width, y1: y + 1 });
    addText(features, text, x, y, { sizeMm: TEXT_MM.label * 0.9, anchor: edge.side === 'right' ? 'end' : 'start', weight: 'bold', halo: true, role: 'match-label' }).attr('data-x', round3(edge.chainageM));
  }
}

/**
 * Shots beyond the sheet's end (off-end shots when the sheet shows the spread): named at the
 * plot's edge with their chainage and an arrow, one line each, under the top of the plot.
 */
function offSheetShots(svg: Svg, shots: readonly ShotPlacement[], frame: SectionFrame, side: 'left' | 'right'): void {
  const ordered = [...shots].sort((a, b) => (side === 'left' ? b.x - a.x : a.x - b.x));
  ordered.forEach((s, i) => {
    const y = frame.plot.y0 + 3.2 + i * TEXT_MM.label * 1.2;
    const text = side === 'left' ? `← shot ${s.id} at ${chainage(s.x)}` : `shot ${s.id} at ${chainage(s.x)} →`;
    const x = side === 'left' ? frame.plot.x0 + 1.2 : frame.plot.x1 - 1.2;
    addText(svg, text, x, y, { sizeMm: TEXT_MM.label * 0.85, anchor: side === 'left' ? 'start' : 'end', fill: SECTION_COLOURS.shot, weight: 'bold', halo: true, role: 'shot-off-sheet' }).attr({ 'data-shot': s.id, 'data-x': s.x });
  });
}

/** The scale bars and the stated scale under the rows. */
function scaleBars(svg: Svg, plan: SheetPlan, top: number, interval: number): void {
  const x0 = PLOT_LEFT_MM;
  const y = top + 2.5;
  const width = horizontalScaleBar(svg, x0, y, plan.mmPerM, 60);
  const vx = x0 + width + 14;
  verticalScaleBar(svg, vx, top + SCALE_ZONE_MM - 1.5, plan.verticalMmPerM, 8);
  const text =
    `Scale 1:${groupThousands(plan.scale)} along the line, 1:${groupThousands(plan.scale / plan.verticalExaggeration)} vertically ` +
    `(vertical exaggeration ${formatExaggeration(plan.verticalExaggeration)}), true when printed on ${plan.paper} landscape at 100 %.`;
  addText(svg, text, vx + 16, y + 1.2, { sizeMm: 2.4, role: 'scale-statement' });
  const every = interval === 1 ? 'Numbers and depths under every geophone.' : `Numbers and depths under every ${ordinal(interval)} geophone from no. 1, so that no two labels touch.`;
  addText(svg, every, vx + 16, y + 4.6, { sizeMm: 2.4, role: 'label-interval' }).attr('data-interval', interval);
}

/** The title block's dip line for one refractor ("refractor", or "first"/"second refractor" on three-layer lines). */
function dipText(dip: Interpretation['features']['dip'] | undefined, refractor: string): string {
  if (!dip || !Number.isFinite(dip.degrees)) return refractor === 'refractor' ? 'no single planar dip' : `${refractor}: no single planar dip`;
  const degrees = dip.degrees;
  if (Math.abs(degrees) < 0.05) return `${refractor} dip 0.0° (level)`;
  return `${refractor} dip ${fixed(Math.abs(degrees), 1)}°, deepening to ${degrees > 0 ? '+x' : '−x'}`;
}

function drawLayerLabels(
  parent: Parameters<typeof layerLabel>[0],
  interpretation: Interpretation,
  frame: SectionFrame,
  placer: LabelPlacer,
  ground: ProfilePoint[],
  refractor: ProfilePoint[][],
  refractor2: ProfilePoint[][],
  hasSecond: boolean,
  window: SheetWindow,
): void {
  const layers = interpretation.layers ?? [];
  const covered = refractor.flat().filter((p) => p.x >= window.fromM && p.x <= window.toM);
  if (covered.length === 0) return;
  const from = covered[0].x;
  const to = covered[covered.length - 1].x;
  const xs = [0.5, 0.3, 0.7, 0.15, 0.85, 0.4, 0.6, 0.05, 0.95].map((f) => from + f * (to - from));
  const foot = () => frame.elevation.domain[0];
  const onGround = (x: number) => elevationOnProfile([ground], x);
  const on1 = (x: number) => elevationOnProfile(refractor, x);
  const on2 = (x: number) => elevationOnProfile(refractor2, x);
  const segments = interpretation.refractorVelocity ?? [];
  if (layers[0]) layerLabel(parent, `layer 1: ${formatVelocity(layers[0].velocity)}`, frame, placer, onGround, on1, xs);
  if (layers[1]) {
    const mean = !hasSecond && segments.length > 1 ? ' (mean)' : '';
    layerLabel(parent, `layer 2: ${formatVelocity(layers[1].velocity)}${mean}`, frame, placer, on1, hasSecond ? on2 : foot, xs);
  }
  if (hasSecond && layers[2]) layerLabel(parent, `layer 3: ${formatVelocity(layers[2].velocity)}`, frame, placer, on2, foot, xs);
}
