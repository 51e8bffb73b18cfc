/**
 * Three-layer lines: the second refractor by layer stripping, a stage that consumes delay
 * times. Both refractors' delay times come from refractor-delays.ts (the plus-minus core
 * of every refractor, on branch-1 and branch-2 picks); V1 and the two-layer depths come
 * unrounded from the two-layer stages, V2 from the branch-1 minus times where they give
 * one (else from the two-layer stages). Where the first refractor gives no first arrival at
 * all (the second overtakes it first), its delay is interpolated between the nearest
 * stations that have one, or held beyond the last: common practice for a layer seen over
 * part of the line only; flagged per station and warned.
 * Depth: layer stripping (layer-stripping.ts; Kearey, Brooks & Hill 2002, ch. 5; Telford,
 * Geldart & Sheriff 1990, ch. 4) gives the thickness of each layer measured normal to the
 * interfaces at each station:
 *   delay₁ = h1·cos θ12/V1,   delay₂ = h1·cos θ13/V1 + h2·cos θ23/V2,   sin θij = Vi/Vj.
 * Each thickness is then placed as an envelope of arcs (Hagedoorn 1959; depth-arcs.ts), as
 * the first refractor of a two-layer line is: arcs of radius h1 about the geophones give
 * the first refractor and the foot of each arc on it; arcs of radius h2 about those feet
 * give the second, whose elevation under each geophone is read off its envelope (where no
 * arc reaches, h2 is hung below the first refractor). Under dipping or curved interfaces
 * this puts the depth below the geophone rather than along the normal, the same care as
 * the first refractor; on flat layers it is h1 and h1 + h2.
 * Why the first refractor is redone here on a three-layer line: the two-layer section's
 * reciprocal times are read from the earliest arrival, which on such a line is often the
 * second refractor's, and that inflates T+ of the first refractor.
 * Units: m, ms, m/s. Pure and deterministic; unrounded (toInterpretation rounds).
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis, Warning } from '../output/interpretation.js';
import type { ResolvedOptions } from '../survey/options.js';
import { isFiniteNumber as isNum } from '../shared/numbers.js';
import { positionsTextShort as describeXs, velocityWords } from '../qc/wording.js';
import { refractorDelays, type RefractorDelays } from './refractor-delays.js';
import { stripLayers } from './layer-stripping.js';
import { arcFootPointsM, envelopeElevationsM, verticalDepthsFromArcsM } from './depth-arcs.js';
import { lowerRefractorStructure, type LowerRefractorStructure } from '../structure/lower-refractor.js';

/** What the two-layer stages found, unrounded: the input of the three-layer stage. */
export interface TwoLayerRecord {
  /** Line velocities V1 and V2 (the layer list's), m/s. */
  v1MPerS: number | null;
  v2MPerS: number | null;
  /** V1 and V2 under each station, m/s (V2 null where the station has no plus time). */
  v1At: (number | null)[];
  v2At: (number | null)[];
  /** Vertical depth to the first refractor from the two-layer section, m. */
  depthM: (number | null)[];
}

export interface SecondRefractorMap {
  /** True when V3 and at least one depth to the second refractor were found. */
  mapped: boolean;
  first: RefractorDelays;
  second: RefractorDelays;
  /** Layer velocities used for stripping (line values), m/s. */
  velocitiesMPerS: (number | null)[];
  /** Vertical depth to each refractor per geophone, m: [first, second]. */
  depthM: [number | null, number | null][];
  /** Thickness of layers 1 and 2 normal to the interfaces (the arc radii), m. */
  normalThicknessM: [number | null, number | null][];
  /** Steps and dip of the second refractor; null until it is mapped. */
  structure: LowerRefractorStructure | null;
  warnings: Warning[];
}

/** The three-layer stage's result: the map (when branch 2 was found), its warnings, and the two-layer notes it answers. */
export interface ThreeLayerSection {
  map: SecondRefractorMap | null;
  warnings: Warning[];
  /**
   * True for a two-layer note that this map answers, so it is not reported: the "second
   * refractor not mapped" note, "no pair / too few picks for V2" (the map has its own
   * delays and V2 from the lines), and a first-refractor gap the map fills.
   */
  answers: (warning: Warning) => boolean;
}

const ANSWERED_WHEN_MAPPED = new Set(['second-refractor-not-mapped', 'no-opposing-pair', 'few-refracted-picks']);

/**
 * The three-layer stage (see the file comment); null on a line with no branch-2 pick and
 * no three-layer request.
 */
export function secondRefractor(survey: Survey, shots: ShotAnalysis[], twoLayer: TwoLayerRecord, options: ResolvedOptions): ThreeLayerSection | null {
  const none = (): boolean => false;
  if (!shots.some((s) => s.branchOfPick.includes(2))) {
    if (options.layers !== 3) return null;
    return {
      map: null,
      answers: none,
      warnings: [
        {
          code: 'second-refractor-not-found',
          message: 'Three layers were asked for, but no shot has enough arrivals beyond the first refracted branch to form a second one, so only the first refractor is mapped.',
        },
      ],
    };
  }
  const map = mapSecondRefractor(survey, shots, twoLayer, options);
  if (!map.mapped || map.velocitiesMPerS[2] === null) return { map, warnings: map.warnings, answers: none };
  const xs = survey.geophones.map((g) => g.x);
  const gaps = xs.filter((_, i) => map.depthM[i][1] === null);
  const warnings = [...map.warnings];
  if (gaps.length > 0) {
    warnings.push({
      code: 'second-refractor-no-coverage',
      message: `No depth to the second refractor at ${describeXs(gaps)}: no branch-2 arrival reaches there, or the first refractor's depth is missing.`,
      x: gaps[0],
    });
  }
  const filled = (x: number | undefined): boolean =>
    xs.some((sx, i) => sx === x && (map.depthM[i][0] !== null || twoLayer.depthM[i] !== null));
  return { map, warnings, answers: (w) => ANSWERED_WHEN_MAPPED.has(w.code) || (w.code === 'no-coverage' && filled(w.x)) };
}

/** Delay implied by a depth h above a refractor of velocity vBelow, ms: h·cos θ/V1. */
function delayOfDepthMs(depthM: number, v1: number, vBelow: number): number {
  return (1000 * depthM * Math.sqrt(1 - (v1 / vBelow) ** 2)) / v1;
}

/**
 * Both refractors of a three-layer line (see the file comment). Depth to the first
 * refractor: from its own delay times (branch-1 picks, branch-1 reciprocal times); where
 * those are missing, the two-layer section's depth. Depth to the second: stripping.
 * stage 'thicknesses' stops after stripping (normalThicknessM set; no depths, no arcs, no
 * structure, mapped false): what the rock-step test re-runs on simulated picks
 * (rock-steps.ts), without the O(n²) arcs.
 */
export function mapSecondRefractor(survey: Survey, shots: ShotAnalysis[], twoLayer: TwoLayerRecord, options: ResolvedOptions, stage: 'full' | 'thicknesses' = 'full'): SecondRefractorMap {
  const n = survey.geophones.length;
  const xs = survey.geophones.map((g) => g.x);
  const first = refractorDelays(survey, shots, 1, options);
  const second = shots.some((s) => s.branchOfPick.includes(2))
    ? refractorDelays(survey, shots, 2, options)
    : { velocityMPerS: null, velocitySource: null, delayTimeMs: xs.map(() => null), delaySource: xs.map(() => null), pairCount: 0 };
  const warnings: Warning[] = [];
  const v1Line = positive(twoLayer.v1MPerS);
  // V2 from the branch-1 picks' own minus times (both directions, Hagedoorn 1959) when
  // they give one: on a three-layer line the two-layer section's V2 is refined on depths
  // read from mixed branches (measured on the issue line: 1546 against 1600 m/s). Else the
  // two-layer V2 (the layer list gives V2 only under a V1, toInterpretation), else the
  // branch-1 velocity from any source.
  const ownV2 = first.velocitySource === 'minus-times' ? positive(first.velocityMPerS) : null;
  const v2Line = ownV2 ?? (v1Line !== null ? positive(twoLayer.v2MPerS) : null) ?? positive(first.velocityMPerS);
  const v3 = positive(second.velocityMPerS);
  const depthM: [number | null, number | null][] = xs.map(() => [null, null]);
  const normalM: [number | null, number | null][] = xs.map(() => [null, null]);
  const result = (mapped: boolean, structure: LowerRefractorStructure | null = null): SecondRefractorMap => ({
    mapped,
    first,
    second,
    velocitiesMPerS: [v1Line, v2Line, v3],
    depthM,
    normalThicknessM: normalM,
    structure,
    warnings,
  });
  if (!shots.some((s) => s.branchOfPick.includes(2))) return result(false);
  if (v3 === null) {
    warnings.push({
      code: 'second-refractor-no-velocity',
      message: 'Arrivals were assigned to a second refractor but no branch line or minus times give its velocity, so no depths to it are shown.',
    });
    return result(false);
  }
  if (second.velocitySource === 'one-way-apparent') {
    warnings.push({
      code: 'second-refractor-one-way',
      message: `The second refractor's arrivals were recorded shooting one way only, so its velocity (${velocityWords(v3)}) is an apparent velocity: too high shooting up-dip, too low down-dip. Shoot from the other end to measure it.`,
    });
  }
  if (first.velocitySource === 'one-way-apparent') {
    const seenBy = shots.filter((s) => s.branchOfPick.includes(1)).map((s) => s.id);
    warnings.push({
      code: 'middle-layer-one-way',
      message: `The middle layer's head waves (the first refractor) were recorded shooting one way only${seenBy.length > 0 ? ` (${seenBy.join(', ')})` : ''}, so no opposing pair measures it: its velocity${v2Line !== null ? ` (${velocityWords(v2Line)})` : ''} may be an apparent one (too high shooting up-dip, too low down-dip) and the depths of both refractors rest on one-way delay times. Shoot from the other end, close enough that the middle layer arrives first, to reverse it.`,
    });
  }
  if (v2Line !== null && !(v3 > v2Line)) {
    warnings.push({
      code: 'velocity-inversion',
      message: `The second refractor's velocity (${velocityWords(v3)}) is not above the first refractor's (${velocityWords(v2Line)}). A layer no faster than the one above gives no head wave, so these arrivals are likely a mis-assigned branch; no depths to a second refractor are given (ASTM D5777; USACE EM 1110-1-1802).`,
    });
    return result(false);
  }

  const velocityAt = (i: number): [number, number] | null => {
    const v1 = positive(twoLayer.v1At[i]) ?? v1Line;
    const v2 = ownV2 ?? positive(twoLayer.v2At[i]) ?? v2Line;
    return v1 === null || v2 === null || !(v2 > v1) || !(v3 > v2) ? null : [v1, v2];
  };
  // First-refractor delay: its own (branch-1 picks), else the two-layer section's depth.
  const firstDelay: (number | null)[] = xs.map((_, i) => {
    const v = velocityAt(i);
    const own = first.delayTimeMs[i];
    if (isNum(own) && own >= 0) return own;
    const z = twoLayer.depthM[i];
    return v && isNum(z) && z >= 0 ? delayOfDepthMs(z, v[0], v[1]) : null;
  });
  // Where the first refractor gives no first arrival at all (the second takes over before
  // it is seen), its delay is interpolated between the nearest stations that have one, or
  // held beyond the last. Common practice for a layer seen over part of the line only;
  // flagged per station and warned.
  const interpolated = fillGaps(xs, firstDelay, (i) => second.delayTimeMs[i] !== null);
  interpolated.filled.forEach((f, i) => {
    if (f) first.delaySource[i] = 'interpolated';
  });

  const noFirst: number[] = [];
  const noAnswer: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = velocityAt(i);
    if (v === null) continue;
    const [v1, v2] = v;
    const d1 = interpolated.values[i];
    const d2 = second.delayTimeMs[i];
    if (d1 === null) {
      if (d2 !== null) noFirst.push(xs[i]);
      continue;
    }
    normalM[i][0] = stripLayers([d1], [v1, v2])?.depthsM[0] ?? null;
    if (d2 === null) continue;
    const stripped = d2 >= 0 ? stripLayers([d1, d2], [v1, v2, v3]) : null;
    if (stripped === null) noAnswer.push(xs[i]);
    else normalM[i][1] = stripped.thicknessesM[1];
  }
  if (stage === 'thicknesses') return result(false);
  placeByArcs(survey, normalM, depthM);
  if (noFirst.length > 0) {
    warnings.push({
      code: 'second-refractor-no-first-depth',
      message: `At ${describeXs(noFirst)} there is a delay time to the second refractor but none to the first, so the second depth cannot be stripped there.`,
      x: noFirst[0],
    });
  }
  if (noAnswer.length > 0) {
    warnings.push({
      code: 'second-refractor-above-first',
      message: `At ${describeXs(noAnswer)} the second refractor's delay time is smaller than the first refractor's depth allows (a negative layer thickness), so no second depth is given there: check the branch assignment and the picks.`,
      x: noAnswer[0],
    });
  }
  const interpolatedXs = xs.filter((_, i) => interpolated.filled[i] && depthM[i][1] !== null);
  if (interpolatedXs.length > 0) {
    warnings.push({
      code: 'first-refractor-interpolated',
      message: `At ${describeXs(interpolatedXs)} no shot records the first refractor as a first arrival (the second refractor's arrivals overtake it first), so its delay time there is interpolated between the neighbouring stations (held at the nearest one beyond the last); the split of depth between the two layers there is less certain.`,
      x: interpolatedXs[0],
    });
  }
  const fromIntercepts = xs.filter((_, i) => depthM[i][1] !== null && (second.delaySource[i] === 'intercept' || first.delaySource[i] === 'intercept'));
  if (fromIntercepts.length > 0) {
    warnings.push({
      code: 'delay-from-intercepts',
      message: `At ${describeXs(fromIntercepts)} no opposing pair of shots records one of the refractors, so its delay times come from one-way arrivals and half the shots' intercept times (flat layers under the shots assumed); those depths are less certain.`,
      x: fromIntercepts[0],
    });
  }
  const mapped = depthM.some((d) => d[1] !== null);
  const structure =
    mapped && v1Line !== null && v2Line !== null
      ? lowerRefractorStructure({
          xsM: xs,
          elevationM: survey.geophones.map((g) => g.elevation ?? 0),
          depthM: depthM.map((d) => d[1]),
          velocitiesMPerS: [v1Line, v2Line, v3],
          pickSigmaMs: options.pickUncertaintyMs,
        })
      : null;
  return result(mapped, structure);
}

/**
 * Vertical depths from the normal thicknesses (see the file comment): the first refractor
 * as the envelope of arcs of radius h1 about the geophones, the second as the envelope of
 * arcs of radius h2 about the first arcs' feet. Writes depthM. Cost: that of depth-arcs.ts,
 * O(n²) for n stations.
 */
function placeByArcs(survey: Survey, normalM: [number | null, number | null][], depthM: [number | null, number | null][]): void {
  const xs = survey.geophones.map((g) => g.x);
  const elevation = survey.geophones.map((g) => g.elevation ?? 0);
  const firstArcs = xs.map((x, i) => ({ xM: x, elevationM: elevation[i], normalDepthM: normalM[i][0] }));
  const firstDepth = verticalDepthsFromArcsM(firstArcs);
  const feet = arcFootPointsM(firstArcs);
  const secondArcs = xs.flatMap((_, i) => {
    const foot = feet[i];
    const h2 = normalM[i][1];
    return foot && h2 !== null ? [{ xM: foot.xM, elevationM: foot.elevationM, normalDepthM: h2 }] : [];
  });
  const secondElevation = envelopeElevationsM(secondArcs, xs);
  for (let i = 0; i < xs.length; i++) {
    const [h1, h2] = normalM[i];
    if (h1 === null) continue;
    const z1 = firstDepth[i] ?? h1;
    depthM[i][0] = z1;
    if (h2 === null) continue;
    const below = secondElevation[i];
    depthM[i][1] = below !== null ? Math.max(z1, elevation[i] - below) : z1 + h2;
  }
}

/**
 * Fills gaps of `values` at indices where `wanted`: linear interpolation in x between the
 * nearest values on both sides; beyond the outermost value, that value held (no slope is
 * extrapolated).
 */
function fillGaps(xs: number[], values: (number | null)[], wanted: (i: number) => boolean): { values: (number | null)[]; filled: boolean[] } {
  const out = [...values];
  const filled = values.map(() => false);
  for (let i = 0; i < values.length; i++) {
    if (values[i] !== null || !wanted(i)) continue;
    let a = i - 1;
    while (a >= 0 && values[a] === null) a--;
    let b = i + 1;
    while (b < values.length && values[b] === null) b++;
    if (a < 0 && b >= values.length) continue;
    if (a < 0) out[i] = values[b];
    else if (b >= values.length) out[i] = values[a];
    else {
      const va = values[a] as number;
      const vb = values[b] as number;
      out[i] = va + ((vb - va) * (xs[i] - xs[a])) / (xs[b] - xs[a]);
    }
    filled[i] = true;
  }
  return { values: out, filled };
}

function positive(v: number | null | undefined): number | null {
  return isNum(v) && v > 0 ? v : null;
}
