/**
 * The same line by every method (plus-minus, GRM, time terms), and where their first
 * refractor depths differ by more than the methods' own uncertainty: |z_a − z_b| > √(σ_a² +
 * σ_b²), σ the stations' depthUncertainty (one standard deviation). The two errors are
 * taken as independent although both methods read the same picks (Bevington & Robinson,
 * Data Reduction and Error Analysis, 3rd ed., 2003, ch. 3, for the sum of variances): shared
 * picks make the difference's true σ smaller, so a station this flags differs at least that
 * much (our choice: flag less rather than more). Pure; three interpretations of the line.
 */
import type { Interpretation } from '../output/interpretation.js';
import type { MethodName, Survey } from '../survey/survey.js';
import { interpret } from '../pipeline/interpret.js';
import { roundM } from '../output/output-decimals.js';

/** Order of the methods in the comparison, the figure and the legend. */
export const COMPARED_METHODS: readonly MethodName[] = ['plus-minus', 'grm', 'time-term'];

export interface MethodRun {
  /** The method asked for. */
  method: MethodName;
  /** False when the engine fell back to plus-minus (a warning in the interpretation says why). */
  ran: boolean;
  interpretation: Interpretation;
}

/** One stretch of consecutive stations where two methods differ by more than their combined σ. */
export interface MethodDifference {
  /** The two methods compared (always two). */
  methods: MethodName[];
  /** First and last station of the stretch, m. */
  from: number;
  to: number;
  stations: number;
  /** Largest |Δ depth| in the stretch, m, where, and the combined σ there, m. */
  largest: number;
  atX: number;
  combinedSigma: number;
  /** Sign: positive where the second method puts the refractor deeper. */
  deeperBy: MethodName;
}

export interface MethodComparison {
  runs: MethodRun[];
  differences: MethodDifference[];
}

/** The pairs that are compared, in table order. */
const PAIRS: readonly [MethodName, MethodName][] = [
  ['plus-minus', 'grm'],
  ['plus-minus', 'time-term'],
  ['grm', 'time-term'],
];

/**
 * Every method on the line. `known` is an interpretation already made (the stored one): its
 * method is not run again. A forced three layers with time terms is interpreted as two-layer
 * lines are not: the engine falls back to plus-minus and the run says so (ran false).
 */
export function compareMethods(survey: Survey, known?: Interpretation): MethodComparison {
  const runs = COMPARED_METHODS.map((method): MethodRun => {
    const interpretation = known && known.method === method ? known : interpret({ ...survey, options: { ...survey.options, method } });
    return { method, ran: interpretation.method === method, interpretation };
  });
  return { runs, differences: methodDifferences(runs) };
}

/** Stretches where two methods that both ran differ beyond their combined σ. O(pairs · stations). */
export function methodDifferences(runs: readonly MethodRun[]): MethodDifference[] {
  const out: MethodDifference[] = [];
  for (const [a, b] of PAIRS) {
    const ra = runs.find((r) => r.method === a && r.ran);
    const rb = runs.find((r) => r.method === b && r.ran);
    if (!ra || !rb) continue;
    let open: MethodDifference | null = null;
    const close = () => {
      if (open) out.push(open);
      open = null;
    };
    ra.interpretation.stations.forEach((sa, i) => {
      const sb = rb.interpretation.stations[i];
      const za = sa.depth;
      const zb = sb?.depth ?? null;
      const sigma = sb ? combinedSigmaM(sa, sb) : null;
      if (za === null || zb === null || sigma === null || !(Math.abs(zb - za) > sigma)) {
        close();
        return;
      }
      const delta = zb - za;
      const deeperBy = delta > 0 ? b : a;
      if (open && open.deeperBy !== deeperBy) close();
      if (!open) open = { methods: [a, b], from: sa.x, to: sa.x, stations: 0, largest: 0, atX: sa.x, combinedSigma: sigma, deeperBy };
      open.to = sa.x;
      open.stations++;
      if (Math.abs(delta) > open.largest) {
        open.largest = Math.abs(delta);
        open.atX = sa.x;
        open.combinedSigma = sigma;
      }
    });
    close();
  }
  return out.map((d) => ({ ...d, largest: roundM(d.largest), combinedSigma: roundM(d.combinedSigma) }));
}

type DepthAndSigma = Pick<Interpretation['stations'][number], 'depth' | 'depthUncertainty'>;

/** √(σ_a² + σ_b²) of two stations' depths, m; null unless both have a depth and a σ. */
export function combinedSigmaM(a: DepthAndSigma, b: DepthAndSigma): number | null {
  if (a.depth === null || b.depth === null || !isSigma(a.depthUncertainty) || !isSigma(b.depthUncertainty)) return null;
  return Math.hypot(a.depthUncertainty, b.depthUncertainty);
}

/** True where two stations' depths differ by more than their combined σ (see the file comment). */
export function differsBeyondSigma(a: DepthAndSigma, b: DepthAndSigma): boolean {
  const sigma = combinedSigmaM(a, b);
  return sigma !== null && Math.abs((b.depth as number) - (a.depth as number)) > sigma;
}

function isSigma(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v > 0;
}

/** What the service answers about a comparison (the figure carries the lines): per method, whether it ran and why not. */
export interface MethodComparisonSummary {
  runs: { method: MethodName; ran: boolean; note: string | null }[];
  differences: MethodDifference[];
}

/** The comparison without the three interpretations; `note` is the warning that says why a method fell back. O(methods · warnings). */
export function comparisonSummary(comparison: MethodComparison): MethodComparisonSummary {
  return {
    runs: comparison.runs.map((r) => ({
      method: r.method,
      ran: r.ran,
      note: r.ran ? null : (r.interpretation.qc.warnings.find((w) => /^(time-term-|method-)/.test(w.code))?.message ?? null),
    })),
    differences: comparison.differences,
  };
}
