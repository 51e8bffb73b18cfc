/**
 * The one output step: the stages' unrounded records → the declared `Interpretation`,
 * every number rounded here by the table in output-decimals.ts.
 */
import type {
  MinusTimeVelocity,
  BranchLine,
  Interpretation,
  OpposingPairVelocities,
  ReciprocalCheck,
  ShotAnalysis,
  SideBranches,
  Station,
  Warning,
} from './interpretation.js';
import type { Survey } from '../survey/survey.js';
import { CAUTIONS } from '../qc/cautions.js';
import type { MethodName } from '../survey/survey.js';
import type { GrmResult } from '../grm/grm.js';
import { grmOutput } from '../grm/grm-output.js';
import { timeTermOutput, type TimeTermRecord } from '../time-term/time-term-output.js';
import type { EndShotPhantom } from '../plus-minus/end-shot-phantoms.js';
import type { RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import type { FirstRefractorSection } from '../depth/first-refractor-section.js';
import { depthUncertaintyM, plusSigmaWithSharedPicksMs } from '../depth/depth-uncertainty.js';
import { segmentIndexAt } from '../structure/structure-features.js';
import type { LocalDip } from '../structure/planar-dip.js';
import type { LineDip } from '../structure/line-dip.js';
import type { MinusTimeVelocityResult } from '../velocities/minus-time-velocity.js';
import type { ThreeLayerSection } from '../depth/second-refractor.js';
import { roundDeg, roundM, roundMOrNull, roundMs, roundMsOrNull, roundV, roundVOrNull } from './output-decimals.js';

/** Everything the stages found about a line, unrounded: what toInterpretation reads. */
export interface LineRecord {
  survey: Survey;
  shots: ShotAnalysis[];
  phantoms: EndShotPhantom[];
  reciprocalChecks: ReciprocalCheck[];
  direct: { velocity: number | null; perSide: { shot: string; side: 'left' | 'right'; velocity: number }[] };
  v1: number | null;
  v1At: (number | null)[];
  /** V2 of the layer list: the slowness mean of the segments over the covered line. */
  v2: number | null;
  pairVelocities: OpposingPairVelocities[];
  plus: RefractorPlusTimes;
  section: FirstRefractorSection;
  /** The line's T− fit against x. */
  lineFit: MinusTimeVelocityResult;
  /** T− of the widest pair covering each geophone (where the combination gives none). */
  widestMinusMs: (number | null)[];
  dip: LineDip | null;
  localDips: LocalDip[];
  /** The three-layer stage, when the line has a second refractor (or three layers were asked for). */
  threeLayer: ThreeLayerSection | null;
  /** Every warning of the stages, in report order. */
  warnings: Warning[];
  /** Pick uncertainty, ms, and one standard deviation of the line V1, m/s (null without direct sides): for depthUncertainty. */
  pickSigmaMs: number;
  v1SigmaMPerS: number | null;
  /** The method that made the delay times (plus-minus unless GRM was asked for). */
  method?: MethodName;
  /** GRM's functions and optimum (engine/grm/grm.ts), rounded here by grmOutput. */
  grm?: GrmResult | null;
  /** The time-term inversion (engine/time-term/), when it made the delay times: its σ of each geophone term replaces the pairs' in depthUncertainty. */
  timeTerm?: TimeTermRecord | null;
}

/** The declared output of one line (see the file comment). */
export function toInterpretation(r: LineRecord): Interpretation {
  const { survey, plus, section } = r;
  const elevation = survey.geophones.map((g) => g.elevation ?? 0);
  const { normalDepthM, verticalDepthM } = section.depths;
  const plusTimeMs = plus.combined.plusTimeMs;
  // On GRM lines the same pairs, with as many picks each, stand behind every time-depth (read
  // at X and Y instead of G), so the same shared-pick propagation applies.
  const plusSigmaMs = plusSigmaWithSharedPicksMs(plus.pairs, plus.combined.contributing, r.pickSigmaMs);
  // Time terms: σ of each term from the inversion's covariance (time-terms.ts), which counts every pick once.
  const delaySigmaMs = r.timeTerm ? r.timeTerm.geophoneTermSigmaMs : plusSigmaMs.map((s) => (s === null ? null : s / 2));
  const stations: Station[] = survey.geophones.map((g, i) => {
    const depth = verticalDepthM[i];
    return {
      x: g.x,
      elevation: elevation[i],
      delayTime: roundMsOrNull(plus.delayTimeMs[i]),
      depth: roundMOrNull(depth),
      refractorElevation: roundMOrNull(depth === null ? null : elevation[i] - depth),
      depths: [roundMOrNull(depth)],
      v1: roundVOrNull(r.v1At[i]),
      refractorVelocity: roundVOrNull(plusTimeMs[i] === null ? null : section.v2At[i]),
      depthUncertainty: roundMOrNull(
        depthUncertaintyM({
          depthM: depth,
          delaySigmaMs: delaySigmaMs[i],
          v1: r.v1At[i],
          v1SigmaMPerS: r.v1SigmaMPerS,
          v2: section.v2At[i],
          v2SigmaMPerS: section.segments.length > 0 ? section.segments[segmentIndexAt(section.segments, g.x)].standardError : null,
        }),
      ),
      normalDepth: roundMOrNull(normalDepthM[i]),
      plusTime: roundMsOrNull(plusTimeMs[i]),
      minusTime: roundMsOrNull(section.combinedMinus.valueMs[i] ?? r.widestMinusMs[i]),
      coverage: plus.delaySource[i] ?? 'none',
      pairCount: plus.combined.contributing[i].length,
    };
  });

  const segments = section.segments;
  const coveredX = survey.geophones.map((g) => g.x).filter((_, i) => plusTimeMs[i] !== null);
  const refractorVelocity =
    segments.length > 0 && coveredX.length > 0
      ? segments.map((g, k) => ({
          from: k === 0 ? coveredX[0] : roundM(g.from),
          to: k === segments.length - 1 ? coveredX[coveredX.length - 1] : roundM(g.to),
          velocity: roundV(g.velocity),
        }))
      : [];
  const twoLayers = r.v1 === null ? [] : [r.v1, r.v2].filter((v): v is number => v !== null).map((v) => ({ velocity: roundV(v) }));
  const map = r.threeLayer?.map;
  const v3 = map?.mapped ? map.velocitiesMPerS[2] : null;
  const layers = map && v3 !== null ? [twoLayers[0], { velocity: roundV(map.velocitiesMPerS[1] as number) }, { velocity: roundV(v3) }] : twoLayers;
  const threeLayerStations: Station[] =
    map && v3 !== null
      ? stations.map((st, i) => {
          const [z1, z2] = map.depthM[i];
          if (z1 === null) return { ...st, depths: [st.depth, null] };
          const d1 = map.first.delayTimeMs[i];
          return {
            ...st,
            depth: roundM(z1),
            refractorElevation: roundM(elevation[i] - z1),
            delayTime: d1 !== null && Number.isFinite(d1) ? roundMs(d1) : st.delayTime,
            depths: [roundM(z1), roundMOrNull(z2)],
            // The arc radius of the first refractor on this line: the stripped layer-1 thickness.
            ...(st.normalDepth !== undefined ? { normalDepth: roundMOrNull(map.normalThicknessM[i][0]) } : {}),
            delaySources: [map.first.delaySource[i] ?? (st.depth !== null ? 'pair' : null), map.second.delaySource[i]],
          };
        })
      : stations;

  const features = {
    steps: section.steps.map((st) => ({
      x: roundM(st.x),
      throw: roundM(st.throw),
      ...(st.delayJumpMs !== undefined ? { delayJumpMs: roundMs(st.delayJumpMs) } : {}),
      seenIn: st.seenIn ?? [],
      branchJumps: st.branchJumps.map((b) => ({ shot: b.shot, xSeen: roundM(b.xSeen), jumpMs: roundMs(b.jumpMs) })),
    })),
    velocityChanges: section.changes.map((c) => ({ x: roundM(c.x), left: roundV(c.left), right: roundV(c.right) })),
    dip: r.dip === null ? null : roundDip(r.dip),
    // Added: a straight line through the refractor elevations of each piece between steps
    // and velocity changes (positive where the refractor deepens toward +x).
    localDips: r.localDips.map(roundLocalDip),
    ...(map && v3 !== null && map.structure
      ? {
          lowerRefractor: {
            dip: map.structure.dip ? { degrees: roundDeg(map.structure.dip.degrees), source: 'refractor-elevations' as const, rmsM: roundM(map.structure.dip.rmsM) } : null,
            localDips: map.structure.local.map(roundLocalDip),
            ...(map.structure.stepTest
              ? {
                  steps: map.structure.stepTest.steps.map((st) => ({
                    x: roundM(st.x),
                    throw: roundM(st.throwM),
                    delayJumpMs: roundMs(st.delayJumpMs),
                    seenIn: ['rock-delay-time'],
                    statistic: roundStat(st.statistic),
                    threshold: roundStat(st.threshold),
                  })),
                  stepTest: {
                    statistic: roundStat(map.structure.stepTest.observedMax),
                    threshold: map.structure.stepTest.threshold === null ? null : roundStat(map.structure.stepTest.threshold),
                    replicates: map.structure.stepTest.replicates,
                    pValue: Math.round(map.structure.stepTest.pValue * 1000) / 1000,
                  },
                }
              : {}),
          },
        }
      : {}),
  };

  // The minus-time fit of the single segment, else the line's.
  const minusFit = segments.length === 1 && section.segmentFits[0] ? section.segmentFits[0] : r.lineFit;
  const minusDistance = segments.length === 1 ? section.minusDistance : 'along-line';
  const lineFit = r.lineFit;
  const minusTimeVelocity: MinusTimeVelocity | null = minusFit.ok
    ? {
        velocity: roundV(minusFit.velocity),
        standardError: roundV(minusFit.standardError),
        count: minusFit.count,
        distance: minusDistance,
        ...(lineFit.ok ? { alongLineVelocity: roundV(lineFit.velocity) } : {}),
        ...(segments.length > 1
          ? {
              segments: segments.map((g, k) => ({
                from: roundM(Math.max(g.from, coveredX[0])),
                to: roundM(Math.min(g.to, coveredX[coveredX.length - 1])),
                velocity: roundV(g.velocity),
                standardError: roundV(g.standardError),
                alongLineVelocity: roundV(section.alongLineVelocities[k]),
                count: section.segmentFits[k]?.count ?? 0,
              })),
            }
          : {}),
      }
    : null;

  return {
    method: r.method ?? 'plus-minus',
    ...(survey.name !== undefined ? { name: survey.name } : {}),
    stations: threeLayerStations,
    layers,
    refractorVelocity,
    features,
    qc: { reciprocal: r.reciprocalChecks.map(roundReciprocalCheck), warnings: r.warnings },
    shots: r.shots.map((s) => roundShot(s, r.phantoms)),
    velocityAnalysis: {
      v1: roundVOrNull(r.v1),
      directVelocities: r.direct.perSide.map((p) => ({ ...p, velocity: roundV(p.velocity) })),
      pairs: r.pairVelocities.map(roundPairVelocities),
      minusTimeVelocity,
    },
    cautions: [...CAUTIONS],
    ...(r.grm ? { grm: grmOutput(r.grm) } : {}),
    ...(r.timeTerm ? { timeTerm: timeTermOutput(r.timeTerm, r.shots.map((s) => s.x), coveredX) } : {}),
  };
}

/** A test statistic to 0.01 (it is compared with a threshold of the same rounding). */
function roundStat(v: number): number {
  return Math.round(v * 100) / 100;
}

function roundLocalDip(d: LocalDip): Interpretation['features']['localDips'][number] {
  return { from: roundM(d.from), to: roundM(d.to), degrees: roundDeg(d.degrees), rmsM: roundM(d.rmsM), count: d.count };
}

function roundDip(d: LineDip): NonNullable<Interpretation['features']['dip']> {
  return {
    degrees: roundDeg(d.degrees),
    source: d.source,
    ...(d.rmsM !== undefined ? { rmsM: roundM(d.rmsM) } : {}),
    ...(d.slopeInterceptDegrees !== undefined ? { slopeInterceptDegrees: roundDeg(d.slopeInterceptDegrees) } : {}),
    ...(d.slopeInterceptShots !== undefined ? { slopeInterceptShots: d.slopeInterceptShots } : {}),
  };
}

/** A shot's branch lines rounded, and its phantoming (every source used, every candidate's check). */
function roundShot(shot: ShotAnalysis, phantoms: EndShotPhantom[]): ShotAnalysis {
  const p = phantoms.find((w) => w.shot.id === shot.id && w.result && w.result.phantomCount > 0);
  const phantom =
    p && p.result && p.from
      ? {
          fromShot: p.from.id,
          shiftMs: roundMs(p.result.shiftMs),
          times: p.result.timesMs.map(roundMsOrNull),
          parallelRmsMs: roundMs(p.result.parallelRmsMs),
          fromShots: p.tried.filter((t) => t.used).map((t) => t.from.id),
          checks: p.tried.map((t) => ({
            fromShot: t.from.id,
            shiftMs: roundMs(t.result.shiftMs),
            parallelRmsMs: roundMs(t.result.parallelRmsMs),
            overlapCount: t.result.overlapCount,
            parallel: t.parallel,
            used: t.used,
          })),
        }
      : null;
  return { ...shot, phantom, left: roundSide(shot.left), right: roundSide(shot.right) };
}

function roundBranchLine(line: BranchLine): BranchLine {
  return { ...line, velocity: line.velocity === null ? null : roundV(line.velocity), interceptMs: roundMs(line.interceptMs), fromX: roundM(line.fromX), toX: roundM(line.toX), rmsMs: roundMs(line.rmsMs) };
}

function roundSide(side: SideBranches | null): SideBranches | null {
  if (!side) return null;
  return {
    ...side,
    direct: side.direct ? roundBranchLine(side.direct) : null,
    refracted: side.refracted.map(roundBranchLine),
    crossoverDistance: side.crossoverDistance === null ? null : roundM(side.crossoverDistance),
  };
}

function roundReciprocalCheck(c: ReciprocalCheck): ReciprocalCheck {
  return {
    ...c,
    forwardMs: roundMs(c.forwardMs),
    reverseMs: roundMs(c.reverseMs),
    differenceMs: roundMs(c.differenceMs),
    ...(c.forwardGapM !== undefined ? { forwardGapM: roundM(c.forwardGapM) } : {}),
    ...(c.reverseGapM !== undefined ? { reverseGapM: roundM(c.reverseGapM) } : {}),
  };
}

function roundPairVelocities(p: OpposingPairVelocities): OpposingPairVelocities {
  return {
    ...p,
    downDipVelocity: roundV(p.downDipVelocity),
    upDipVelocity: roundV(p.upDipVelocity),
    trueVelocity: roundV(p.trueVelocity),
    trueVelocityGentleDip: roundV(p.trueVelocityGentleDip),
    dipDegrees: roundDeg(p.dipDegrees),
    criticalAngleDegrees: roundDeg(p.criticalAngleDegrees),
    depthUnderShots: p.depthUnderShots.map((d) => ({ ...d, normalDepth: roundM(d.normalDepth), verticalDepth: roundM(d.verticalDepth) })),
  };
}
