/**
 * The JSON Schema of the interpretation (api-v1.md, "The interpretation"), built with
 * TypeBox beside the hand-written type in `engine/output/interpretation.ts`. Every object is
 * closed (`additionalProperties: false`): the service's response serialiser sends only
 * declared fields, so a field the engine adds must be declared in both places — the type
 * check at the bottom fails to compile when they drift apart, and the golden test fails when
 * the engine sends a field neither declares.
 *
 * Units: m, ms, m/s, degrees. Numbers are rounded by the engine (0.01 m, 0.01 ms, 1 m/s,
 * 0.01°) before they reach the schema.
 */
import { Type, type Static, type TSchema } from '@sinclair/typebox';
import { KNOWN_METHODS } from '../survey/options.js';
import type { Interpretation } from '../output/interpretation.js';
import type { Assert, Same } from './same-type.js';

const closed = { additionalProperties: false } as const;
const nullable = <T extends TSchema>(schema: T) => Type.Union([schema, Type.Null()]);
const num = (description?: string) => Type.Number(description ? { description } : {});
const int = (description?: string) => Type.Integer(description ? { minimum: 0, description } : { minimum: 0 });
const str = (description?: string) => Type.String(description ? { description } : {});
const opt = Type.Optional;
const literals = <T extends string>(values: readonly T[], description?: string) =>
  Type.Union(values.map((v) => Type.Literal(v)), description ? { description } : {});
const shotPair = Type.Tuple([Type.String(), Type.String()]);

export const StationSchema = Type.Object(
  {
    x: num('Position along the line, m.'),
    elevation: num('Ground elevation, m.'),
    delayTime: nullable(num('Delay time to the first refractor, ms.')),
    depth: nullable(num('Vertical depth to the first refractor, m.')),
    refractorElevation: nullable(num('elevation − depth, m.')),
    depths: Type.Array(nullable(num()), { description: 'Vertical depth to each refractor, top first, m.' }),
    v1: nullable(num('Local top-layer velocity, m/s.')),
    refractorVelocity: nullable(num('Local velocity of the first refractor, m/s.')),
    depthUncertainty: opt(nullable(num('One standard deviation of depth, m.'))),
    normalDepth: opt(nullable(num('Depth normal to the refractor, m.'))),
    plusTime: opt(nullable(num('Plus time T+, ms.'))),
    minusTime: opt(nullable(num('Minus time T−, ms.'))),
    coverage: opt(literals(['pair', 'phantom', 'none'] as const, 'How the plus time was found.')),
    pairCount: opt(int('Opposing shot pairs that contributed.')),
    delaySources: opt(
      Type.Array(nullable(literals(['pair', 'phantom', 'intercept', 'interpolated'] as const)), {
        description: 'Three-layer lines: how the delay time to each refractor was found, top first.',
      }),
    ),
    hiddenLayerDepth: opt(
      nullable(num('Where the hidden-layer warning is given: the deepest the first refractor could lie under a layer too thin to arrive first, m.')),
    ),
  },
  { ...closed, title: 'Station' },
);

export const BranchLineSchema = Type.Object(
  {
    velocity: nullable(num('Apparent velocity along the line, m/s; null for a level branch (times that do not change with offset: unbounded).')),
    interceptMs: num('Intercept time at the shot, ms.'),
    fromX: num('m'),
    toX: num('m'),
    count: int('Picks in the fit.'),
    rmsMs: num('RMS misfit, ms.'),
  },
  { ...closed, title: 'BranchLine' },
);

const side = literals(['left', 'right'] as const);

export const SideBranchesSchema = Type.Object(
  {
    side,
    direct: nullable(BranchLineSchema),
    refracted: Type.Array(BranchLineSchema, { description: 'One line per refracted branch, shallowest first.' }),
    crossoverDistance: nullable(num('Offset where the first refracted branch overtakes the direct wave, m.')),
    overridden: Type.Boolean(),
    deeperBranchUnreversed: opt(Type.Boolean()),
  },
  { ...closed, title: 'SideBranches' },
);

export const PhantomSchema = Type.Object(
  {
    fromShot: str(),
    shiftMs: num(),
    times: Type.Array(nullable(num()), { description: 'Phantomed arrivals per geophone, ms.' }),
    parallelRmsMs: num(),
    fromShots: Type.Array(Type.String()),
    checks: Type.Array(
      Type.Object(
        { fromShot: str(), shiftMs: num(), parallelRmsMs: num(), overlapCount: int(), parallel: Type.Boolean(), used: Type.Boolean() },
        closed,
      ),
    ),
  },
  { ...closed, title: 'Phantom' },
);

export const ShotAnalysisSchema = Type.Object(
  {
    id: str(),
    x: num(),
    elevation: num(),
    position: literals(['off-end-left', 'end-left', 'inside', 'end-right', 'off-end-right'] as const),
    left: nullable(SideBranchesSchema),
    right: nullable(SideBranchesSchema),
    branchOfPick: Type.Array(Type.Union([Type.Literal(0), Type.Literal(1), Type.Literal(2), Type.Null()]), {
      description: 'Per geophone: 0 direct, 1 first refractor, 2 second refractor, null no pick.',
    }),
    phantom: opt(nullable(PhantomSchema)),
    modelledMs: opt(Type.Array(nullable(num()), { description: 'First arrivals modelled through the section, ms.' })),
    residualMs: opt(Type.Array(nullable(num()), { description: 'Pick minus modelled first arrival, ms.' })),
  },
  { ...closed, title: 'ShotAnalysis' },
);

export const ReciprocalCheckSchema = Type.Object(
  {
    shots: shotPair,
    forwardMs: num(),
    reverseMs: num(),
    differenceMs: num(),
    ok: Type.Boolean(),
    forwardSource: opt(literals(['geophone', 'extrapolated'] as const)),
    reverseSource: opt(literals(['geophone', 'extrapolated'] as const)),
    forwardGapM: opt(num()),
    reverseGapM: opt(num()),
    extrapolationAllowanceMs: opt(num()),
    toleranceMs: opt(num()),
    wave: opt(
      literals(
        ['direct'] as const,
        "'direct': shots closer than the crossover distance, so the direct-wave times are compared (no head-wave reciprocal time). Absent: head-wave times.",
      ),
    ),
  },
  { ...closed, title: 'ReciprocalCheck' },
);

export const WarningSchema = Type.Object(
  { code: str('Stable kebab-case code.'), message: str(), x: opt(num('Where along the line, m.')) },
  { ...closed, title: 'Warning' },
);

export const StepSchema = Type.Object(
  {
    x: num(),
    throw: num('Positive where the refractor is deeper on the +x side, m.'),
    delayJumpMs: opt(num()),
    seenIn: opt(Type.Array(Type.String())),
    branchJumps: opt(Type.Array(Type.Object({ shot: str(), xSeen: num(), jumpMs: num() }, closed))),
  },
  { ...closed, title: 'Step' },
);

export const DipSchema = Type.Object(
  {
    degrees: num('Positive where the refractor deepens toward +x.'),
    source: literals(['refractor-elevations', 'slope-intercept'] as const),
    rmsM: opt(num()),
    slopeInterceptDegrees: opt(num()),
    slopeInterceptShots: opt(shotPair),
  },
  { ...closed, title: 'Dip' },
);

export const LocalDipSchema = Type.Object(
  { from: num(), to: num(), degrees: num(), rmsM: num(), count: int() },
  { ...closed, title: 'LocalDip' },
);

export const ResidualsSchema = Type.Object(
  {
    rmsMs: num(),
    perShot: Type.Array(Type.Object({ shot: str(), rmsMs: num(), count: int() }, closed)),
    count: int(),
    cellM: num(),
    refractorContinuation: literals(['planar-dip', 'flat'] as const),
  },
  { ...closed, title: 'Residuals' },
);

const layerLabel = literals(['auto', 'two-layer', 'three-layer'] as const);

export const LayerChoiceSchema = Type.Object(
  {
    criterion: literals(['bic'] as const),
    candidates: Type.Array(
      Type.Object({ label: layerLabel, layers: int(), rmsMs: num(), count: int(), chiSquare: num(), parameters: int(), bic: num() }, closed),
    ),
    chosen: layerLabel,
  },
  { ...closed, title: 'LayerChoice' },
);

export const OpposingPairVelocitiesSchema = Type.Object(
  {
    shots: shotPair,
    downDipVelocity: num(),
    upDipVelocity: num(),
    trueVelocity: num(),
    trueVelocityGentleDip: num(),
    dipDegrees: num(),
    criticalAngleDegrees: num(),
    depthUnderShots: Type.Array(Type.Object({ shot: str(), normalDepth: num(), verticalDepth: num() }, closed)),
  },
  { ...closed, title: 'OpposingPairVelocities' },
);

export const MinusTimeVelocitySchema = Type.Object(
  {
    velocity: num(),
    standardError: num(),
    count: int(),
    distance: literals(['along-line', 'along-refractor'] as const),
    alongLineVelocity: opt(num()),
    segments: opt(
      Type.Array(
        Type.Object({ from: num(), to: num(), velocity: num(), standardError: num(), alongLineVelocity: num(), count: int() }, closed),
      ),
    ),
  },
  { ...closed, title: 'MinusTimeVelocity' },
);

export const VelocityAnalysisSchema = Type.Object(
  {
    v1: nullable(num()),
    directVelocities: Type.Array(Type.Object({ shot: str(), side, velocity: num() }, closed)),
    pairs: Type.Array(OpposingPairVelocitiesSchema),
    minusTimeVelocity: nullable(MinusTimeVelocitySchema),
  },
  { ...closed, title: 'VelocityAnalysis' },
);

export const GrmAnalysisSchema = Type.Object(
  {
    optimumXy: num('XY taken, m.'),
    expectedOptimumXy: nullable(num("Palmer's expectation 2·z·tan(ic) for a planar refractor, m.")),
    criterion: str('How the optimum XY was chosen.'),
    xyFunctions: Type.Array(
      Type.Object(
        {
          xy: num('XY, m.'),
          refractorVelocity: nullable(num("V' from the velocity-analysis function, m/s.")),
          velocityRoughness: nullable(num('RMS residual of the velocity-analysis function about a straight line per shot pair, ms (least at the optimum).')),
          timeDepthDetail: nullable(num('RMS second difference of the time-depth function, ms.')),
          stations: Type.Array(
            Type.Object({ x: num('G, midway between X and Y, m.'), velocityAnalysis: nullable(num('t_V, ms.')), timeDepth: nullable(num('t_G, ms.')) }, closed),
          ),
        },
        closed,
      ),
    ),
  },
  { ...closed, title: 'GrmAnalysis', description: 'Generalised reciprocal method (Palmer 1980): the functions at every XY tried and the optimum.' },
);

export const TimeTermAnalysisSchema = Type.Object(
  {
    picks: int('Head-wave picks used.'),
    unknowns: int('Unknowns solved for.'),
    rmsMs: num('RMS of pick − model, ms.'),
    noiseMs: num('Noise the standard errors are scaled by, ms.'),
    segments: Type.Array(Type.Object({ from: num(), to: num(), velocity: num('m/s'), standardError: num('m/s') }, closed)),
    shots: Type.Array(Type.Object({ shot: str(), x: num(), timeTerm: nullable(num('ms')), standardError: nullable(num('ms')) }, closed)),
  },
  { ...closed, title: 'TimeTermAnalysis', description: 'Time-term inversion (Willmore & Bancroft 1960): fit, refractor velocities and shot terms; the geophone terms are stations[].delayTime.' },
);

export const InterpretationSchema = Type.Object(
  {
    method: literals(KNOWN_METHODS, 'The method used.'),
    name: opt(str()),
    stations: Type.Array(StationSchema, { description: 'One entry per geophone, in order.' }),
    layers: Type.Array(Type.Object({ velocity: num('m/s') }, closed), { description: 'Mean velocity per layer, top first.' }),
    refractorVelocity: Type.Array(Type.Object({ from: num(), to: num(), velocity: num() }, closed), {
      description: 'Laterally varying velocity of the first refractor, as segments along the line.',
    }),
    features: Type.Object(
      {
        steps: Type.Array(StepSchema),
        velocityChanges: Type.Array(Type.Object({ x: num(), left: num(), right: num() }, closed)),
        dip: nullable(DipSchema),
        localDips: Type.Array(LocalDipSchema),
        lowerRefractor: opt(
          Type.Object(
            {
              dip: nullable(DipSchema),
              localDips: Type.Array(LocalDipSchema),
              steps: opt(
                Type.Array(
                  Type.Object(
                    {
                      x: num(),
                      throw: num('Change of the middle layer thickness across the step, m; positive where the rock is deeper on the +x side.'),
                      delayJumpMs: num('Jump of the stripped rock delay h2·cos θ23/V2, ms.'),
                      seenIn: Type.Array(Type.String()),
                      statistic: num('Scan statistic (RSS_kink − RSS_step)/σ².'),
                      threshold: num('Monte Carlo threshold the statistic beat.'),
                    },
                    { ...closed, title: 'RockStep' },
                  ),
                ),
              ),
              stepTest: opt(
                Type.Object(
                  {
                    statistic: num('Largest scan statistic on the line.'),
                    threshold: nullable(num('Threshold from the replicates; null when the sequential test stopped early.')),
                    replicates: int('Replicates run.'),
                    pValue: num('Monte Carlo p-value of the largest statistic.'),
                  },
                  { ...closed, title: 'RockStepTest' },
                ),
              ),
            },
            { ...closed, description: 'Three-layer lines: the dip of the second refractor, tested as that of the first, and steps in it found by a jump scan on the stripped middle-layer delay with a Monte Carlo threshold (engine/depth/rock-steps.ts).' },
          ),
        ),
      },
      closed,
    ),
    qc: Type.Object(
      {
        reciprocal: Type.Array(ReciprocalCheckSchema),
        warnings: Type.Array(WarningSchema),
        residuals: opt(ResidualsSchema),
        layerChoice: opt(LayerChoiceSchema),
      },
      closed,
    ),
    shots: Type.Array(ShotAnalysisSchema),
    velocityAnalysis: VelocityAnalysisSchema,
    cautions: Type.Array(Type.String()),
    grm: opt(GrmAnalysisSchema),
    timeTerm: opt(TimeTermAnalysisSchema),
  },
  { ...closed, title: 'Interpretation', description: 'What the engine says about a line (api-v1.md). Units: m, ms, m/s, degrees.' },
);

/** Compile-time: the schema describes exactly the Interpretation type. */
export type InterpretationSchemaMatchesType = Assert<Same<Static<typeof InterpretationSchema>, Interpretation>>;
