/**
 * The depth section: distance along the line against elevation, composed from the small
 * drawing functions of this folder. It draws what the interpretation says and derives
 * nothing new: depths, velocities, steps and dip all come from the Interpretation.
 * The one sum it does — elevation of the second refractor = station elevation − depths[1] —
 * is the definition the API states for refractorElevation, applied to the deeper refractor.
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation, Station } from '../output/interpretation.js';
import { CAUTIONS } from '../qc/cautions.js';
import { createCanvas } from './svg-document.js';
import { PAGE, TEXT_MM } from './page.js';
import { INK, SECTION_COLOURS } from './palette.js';
import { layerCountNotes, titleBlock, titleBlockBottomMm } from './title-block.js';
import { cautionNote, cautionNoteHeightMm } from './caution-note.js';
import { legend, legendHeightMm, type LegendItem } from './legend.js';
import { bottomAxis, leftAxis } from './axis.js';
import { sectionFrame, formatExaggeration, type SectionFrame } from './section-frame.js';
import { profileRuns, refractorPath, elevationOnProfile, type ProfilePoint } from './refractor-path.js';
import { topLayerFill, lowerLayerFill, uncoveredStretches, defineHatch, noCoverageHatch, depthArcs, HATCH_ID, CLIP_ID } from './section-layers.js';
import { groundLine, geophoneMarkers, shotMarkers } from './section-markers.js';
import { stepMarkers, velocityBar, velocityChangeMarkers, layerLabel } from './section-features.js';
import { LabelPlacer } from './label-placer.js';
import { fixed, formatVelocity, round3 } from './format.js';
import { marker } from './markers.js';
import { addText } from './text.js';
import { describeMethod, lineName, shotPlacements, qcSummary } from './describe.js';

export interface SectionOptions {
  /** Draw the depth arc about each geophone where the interpretation gives normalDepth (default true). */
  showArcs?: boolean;
}

const PLOT_LEFT_MM = 22;

export function renderSection(survey: Survey, interpretation: Interpretation, options: SectionOptions = {}): string {
  const name = lineName(survey, interpretation);
  const canvas = createCanvas(`Depth section — ${name}`);
  const svg = canvas.svg;
  const stations: readonly Station[] = interpretation.stations ?? [];
  const shots = shotPlacements(survey, interpretation);

  // Profiles, all straight from the interpretation and the survey geometry.
  const geophones: ProfilePoint[] = survey.geophones.map((g) => ({ x: g.x, elevation: g.elevation ?? 0 }));
  const refractor = profileRuns(stations, (s) => s.x, (s) => s.refractorElevation);
  const hasSecond = stations.some((s) => s.depths?.[1] !== null && s.depths?.[1] !== undefined);
  const refractor2 = hasSecond
    ? profileRuns(stations, (s) => s.x, (s) => {
        const d = s.depths?.[1];
        return d === null || d === undefined ? null : s.elevation - d;
      })
    : [];
  // Where the hidden-layer warning is given: the deepest the refractor could lie (qc).
  const hiddenLimit = profileRuns(stations, (s) => s.x, (s) => (typeof s.hiddenLayerDepth === 'number' ? s.elevation - s.hiddenLayerDepth : null));
  const firstX = geophones.length > 0 ? geophones[0].x : 0;
  const lastX = geophones.length > 0 ? geophones[geophones.length - 1].x : 0;
  const offEnd = shots.filter((s) => s.x < firstX || s.x > lastX).map((s) => ({ x: s.x, elevation: s.elevation }));
  const ground = [...geophones, ...offEnd].sort((a, b) => a.x - b.x);

  // Page layout, top to bottom: title block, plot, axis title, legend, cautions.
  const allXs = [...geophones.map((g) => g.x), ...shots.map((s) => s.x)];
  const xMinM = allXs.length > 0 ? Math.min(...allXs) : 0;
  const xMaxM = allXs.length > 0 ? Math.max(...allXs) : 1;
  const topM = Math.max(...ground.map((p) => p.elevation), ...shots.map((s) => s.elevation), -Infinity);
  const refractorElevations = [...refractor, ...refractor2, ...hiddenLimit].flat().map((p) => p.elevation);
  const groundMin = Math.min(...ground.map((p) => p.elevation), Infinity);
  const bottomM = refractorElevations.length > 0 ? Math.min(...refractorElevations) : (Number.isFinite(groundMin) ? groundMin : 0) - 0.15 * Math.max(1, xMaxM - xMinM);
  const contentWidth = PAGE.widthMm - 2 * PAGE.marginMm;
  const cautions = interpretation.cautions && interpretation.cautions.length > 0 ? interpretation.cautions : CAUTIONS;

  const hasUncovered = stations.some((s) => s.refractorElevation === null);
  const arcsWanted = options.showArcs !== false && stations.some((s) => typeof s.normalDepth === 'number' && s.normalDepth > 0);
  const legendItems = sectionLegend({
    hasSecond,
    hiddenLimit: hiddenLimit.length > 0,
    arcs: arcsWanted,
    uncovered: hasUncovered,
    steps: (interpretation.features?.steps ?? []).length > 0,
    changes: (interpretation.features?.velocityChanges ?? []).length > 0,
    segments: (interpretation.refractorVelocity ?? []).length > 0,
  });
  const cautionHeight = cautionNoteHeightMm(cautions, contentWidth);
  const cautionTop = PAGE.heightMm - PAGE.marginMm + 1 - cautionHeight;
  const legendHeight = legendHeightMm(legendItems, contentWidth);
  const legendTop = cautionTop - 2 - legendHeight;
  const plotBottom = legendTop - 11;

  // The title block's height (its number of lines) fixes the top of the plot, and the plot's
  // scales give the exaggeration the block states.
  const qcNotes = [...layerCountNotes(interpretation, survey.options?.layers), ...qcSummary(interpretation)];
  const lowerDip = interpretation.features?.lowerRefractor;
  const dipNotes = lowerDip
    ? [
        { text: dipText(interpretation.features?.dip, 'first refractor'), role: 'dip' },
        { text: dipText(lowerDip.dip, 'second refractor'), role: 'dip-2' },
      ]
    : [{ text: dipText(interpretation.features?.dip, 'refractor'), role: 'dip' }];
  const ruleYPlanned = titleBlockBottomMm({ dateLine: survey.date, notes: [null, ...dipNotes.map(() => null), ...qcNotes] });
  const frame = sectionFrame(
    { xMinM, xMaxM: Math.max(xMaxM, xMinM + 1), topM: Number.isFinite(topM) ? topM : 0, bottomM },
    { x0: PLOT_LEFT_MM, y0: ruleYPlanned + 4, x1: PAGE.widthMm - PAGE.marginMm, y1: plotBottom },
  );
  const notes = [
    { text: `vertical exaggeration ${formatExaggeration(frame.verticalExaggeration)}`, role: 'vertical-exaggeration' },
    ...dipNotes,
    ...qcNotes,
  ];
  const subtitle = ['Depth section', describeMethod(interpretation.method), `${survey.geophones.length} geophones`, `${survey.shots.length} shots`]
    .filter((part) => part.length > 0)
    .join(' · ');
  titleBlock(svg, { title: name, subtitle, dateLine: survey.date, notes });

  defineHatch(svg);
  const clip = svg.clip();
  clip.id(CLIP_ID);
  clip.rect(round3(frame.plot.x1 - frame.plot.x0), round3(frame.plot.y1 - frame.plot.y0)).attr({ x: round3(frame.plot.x0), y: round3(frame.plot.y0) });

  const plot = svg.group().attr({ 'data-role': 'section-plot', 'clip-path': `url(#${CLIP_ID})` });
  topLayerFill(plot, refractor, stations, frame);
  lowerLayerFill(plot, refractor, frame, 2, SECTION_COLOURS.layer2Fill);
  if (hasSecond) lowerLayerFill(plot, refractor2, frame, 3, SECTION_COLOURS.layer3Fill);
  const placer = new LabelPlacer();
  const hatchCentres = uncoveredStretches(stations).map((stretch) => noCoverageHatch(plot, stretch, frame));
  if (arcsWanted) depthArcs(plot, stations, frame);
  if (hasSecond) refractorPath(plot, refractor2, frame.x, frame.elevation, { colour: SECTION_COLOURS.refractor2, widthMm: 0.6, dash: '2 1.2', role: 'refractor-2' });
  if (hiddenLimit.length > 0) refractorPath(plot, hiddenLimit, frame.x, frame.elevation, { colour: SECTION_COLOURS.refractor, widthMm: 0.35, dash: '0.8 1.6', role: 'hidden-layer-limit' });
  refractorPath(plot, refractor, frame.x, frame.elevation, { colour: SECTION_COLOURS.refractor, widthMm: 0.8, role: 'refractor' });
  groundLine(plot, ground, frame);
  geophoneMarkers(svg, geophones, frame);
  shotMarkers(svg, shots, frame);
  for (const s of shots) placer.reserve({ x0: frame.x(s.x) - 4, y0: frame.elevation(s.elevation) - 12, x1: frame.x(s.x) + 4, y1: frame.elevation(s.elevation) });

  const features = svg.group().attr('data-role', 'features');
  velocityBar(features, interpretation.refractorVelocity ?? [], frame, placer);
  // Labels about the refractor stay off the hatched stretches, where there is no refractor.
  for (const h of hatchCentres) placer.reserve({ x0: h.cx - h.widthMm / 2, y0: frame.plot.y0, x1: h.cx + h.widthMm / 2, y1: frame.plot.y1 - 7 });
  stepMarkers(features, interpretation.features?.steps ?? [], refractor, frame, placer);
  velocityChangeMarkers(features, interpretation.features?.velocityChanges ?? [], refractor, frame, placer);
  for (const h of hatchCentres) {
    const group = features.group().attr('data-role', 'no-coverage-label');
    const text = 'no coverage';
    const rotate = h.widthMm < 22;
    addText(group, text, h.cx + (rotate ? TEXT_MM.label * 0.35 : 0), h.cy, { sizeMm: TEXT_MM.label, anchor: 'middle', halo: true, fill: INK.muted, italic: true, rotateDeg: rotate ? -90 : 0 });
  }
  drawLayerLabels(features, interpretation, frame, placer, ground, refractor, refractor2, hasSecond);

  // Frame and axes over the fills.
  svg.rect(round3(frame.plot.x1 - frame.plot.x0), round3(frame.plot.y1 - frame.plot.y0))
    .attr({ x: round3(frame.plot.x0), y: round3(frame.plot.y0), fill: 'none', stroke: INK.frame, 'stroke-width': 0.3, 'data-role': 'plot-frame' });
  bottomAxis(svg, frame.x, { atMm: frame.plot.y1, title: 'distance along line (m)', maxTicks: 14, role: 'x' });
  leftAxis(svg, frame.elevation, { atMm: frame.plot.x0, title: 'elevation (m)', maxTicks: 9, role: 'y', titleXMm: PAGE.marginMm + 2.2 });

  legend(svg, legendItems, PAGE.marginMm, legendTop + 2, contentWidth);
  cautionNote(svg, cautions, PAGE.marginMm, cautionTop, contentWidth);
  return canvas.serialize();
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
): void {
  const layers = interpretation.layers ?? [];
  const covered = refractor.flat();
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

interface LegendNeeds {
  hasSecond: boolean;
  hiddenLimit: boolean;
  arcs: boolean;
  uncovered: boolean;
  steps: boolean;
  changes: boolean;
  segments: boolean;
}

function sectionLegend(needs: LegendNeeds): LegendItem[] {
  const swatch = (colour: string) => (g: Parameters<LegendItem['glyph']>[0], cx: number, cy: number) => {
    g.rect(5, 2.6).attr({ x: round3(cx - 2.5), y: round3(cy - 1.3), fill: colour, stroke: INK.frame, 'stroke-width': 0.15 });
  };
  const stroke = (colour: string, width: number, dash?: string) => (g: Parameters<LegendItem['glyph']>[0], cx: number, cy: number) => {
    const line = g.line(round3(cx - 2.8), round3(cy), round3(cx + 2.8), round3(cy)).attr({ stroke: colour, 'stroke-width': width });
    if (dash) line.attr('stroke-dasharray', dash);
  };
  const items: LegendItem[] = [
    {
      label: 'ground, geophones',
      glyph: (g, cx, cy) => {
        stroke(SECTION_COLOURS.ground, 0.45)(g, cx, cy + 0.9);
        marker(g, 'triangle-down', cx, cy, 1.8, { colour: SECTION_COLOURS.geophone, strokeMm: 0.1 });
      },
    },
    { label: 'shot', glyph: (g, cx, cy) => void marker(g, 'star', cx, cy, 2.8, { colour: SECTION_COLOURS.shot, strokeMm: 0.15 }) },
    { label: 'refractor', glyph: stroke(SECTION_COLOURS.refractor, 0.8) },
  ];
  if (needs.hasSecond) items.push({ label: 'second refractor', glyph: stroke(SECTION_COLOURS.refractor2, 0.6, '2 1.2') });
  if (needs.hiddenLimit) items.push({ label: 'deepest refractor if a hidden layer is present (see warnings)', glyph: stroke(SECTION_COLOURS.refractor, 0.35, '0.8 1.6') });
  if (needs.arcs) {
    items.push({
      label: 'depth arcs',
      glyph: (g, cx, cy) => void g.path(`M${round3(cx - 2.6)},${round3(cy - 1)}A2.6,2 0 0 0 ${round3(cx + 2.6)},${round3(cy - 1)}`).attr({ fill: 'none', stroke: SECTION_COLOURS.arc, 'stroke-width': 0.25 }),
    });
  }
  items.push({ label: 'top layer', glyph: swatch(SECTION_COLOURS.layer1Fill) });
  items.push({ label: 'below refractor', glyph: swatch(SECTION_COLOURS.layer2Fill) });
  if (needs.hasSecond) items.push({ label: 'below second refractor', glyph: swatch(SECTION_COLOURS.layer3Fill) });
  if (needs.uncovered) items.push({ label: 'no coverage', glyph: swatch(`url(#${HATCH_ID})`) });
  if (needs.segments) {
    items.push({
      label: 'refractor velocity along line',
      glyph: (g, cx, cy) => {
        const s = { stroke: SECTION_COLOURS.refractor, 'stroke-width': 0.35 };
        g.line(round3(cx - 2.6), round3(cy), round3(cx + 2.6), round3(cy)).attr(s);
        g.line(round3(cx - 2.6), round3(cy - 1), round3(cx - 2.6), round3(cy + 1)).attr(s);
        g.line(round3(cx + 2.6), round3(cy - 1), round3(cx + 2.6), round3(cy + 1)).attr(s);
      },
    });
  }
  if (needs.steps) items.push({ label: 'step (throw)', glyph: (g, cx, cy) => void g.line(round3(cx), round3(cy - 1.6), round3(cx), round3(cy + 1.6)).attr({ stroke: SECTION_COLOURS.step, 'stroke-width': 0.8 }) });
  if (needs.changes) items.push({ label: 'velocity change', glyph: (g, cx, cy) => void g.line(round3(cx), round3(cy - 1.6), round3(cx), round3(cy + 1.6)).attr({ stroke: SECTION_COLOURS.velocityChange, 'stroke-width': 0.45, 'stroke-dasharray': '0.6 0.9' }) });
  return items;
}
