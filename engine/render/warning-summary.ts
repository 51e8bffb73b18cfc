/**
 * The interpretation's warnings in words for the section's title block: one short phrase per
 * kind of warning, with how often and where, so a reader of the printed sheet knows what
 * was flagged without the table ("hidden layer possible at 0–46 m", never "1 warning").
 * Words only; the full messages stay in the interpretation. O(W) for W warnings.
 */
import type { Warning } from '../output/interpretation.js';
import { groupThousands } from './format.js';

/** A phrase per warning code (codes from engine/qc); an unknown code falls back to its message's first sentence. */
const PHRASES: Readonly<Record<string, string>> = {
  'hidden-layer': 'a hidden layer could lie above the refractor (deepest limit drawn dash-dot)',
  'reciprocal-misfit': 'reciprocal times of shot pairs disagree',
  'reciprocal-unavailable': 'reciprocal time not checked for some shot pairs',
  'no-coverage': 'no depth where no shot pair covers the line (hatched)',
  'phantom-not-parallel': 'a phantom was refused: branches not parallel',
  'first-refractor-interpolated': 'first refractor interpolated between stations (dotted)',
  'delay-from-intercepts': 'depths from intercept times, one-way (dashed)',
  'velocity-inversion': 'a branch slower than the one before it (velocity inversion?)',
  'v2-not-above-v1': 'refractor velocity not above the top-layer velocity',
  'impossible-velocity': 'an impossible velocity was set aside',
  'refractor-step': 'a step in the refractor',
  'rock-step': 'a step in the rock (second refractor)',
  'rock-steps-not-sought': 'steps in the rock not sought (line too large for the test)',
  'refractor-velocity-change': 'the refractor velocity changes along the line',
  'lateral-top-layer-velocity': 'top-layer velocity varies along the line',
  'residuals-high': 'picks misfit the modelled first arrivals',
  'residuals-not-computed': 'picks not checked against modelled arrivals',
  'residuals-shot-not-modelled': 'some shots not modelled in the picks check',
  'few-refracted-picks': 'too few refracted picks on the line',
  'few-refracted-picks-side': 'few picks on some branches',
  'deeper-refractor-unreversed': 'a faster branch seen one way only, kept on the first refractor',
  'middle-layer-one-way': 'middle layer seen one way only',
  'plus-times-disagree': 'plus times of different shot pairs disagree',
  'plus-time-from-misfit-pair': 'depths from shot pairs that fail the reciprocal check',
  'negative-delay-time': 'negative delay times: no depth given there',
  'no-opposing-shots': 'no opposing shots: no depths',
  'no-opposing-pair': 'no opposing shot pair: no depths',
  'no-fittable-branch': 'a shot with no branch that could be fitted',
  'no-direct-velocity': 'no direct wave: top-layer velocity unknown',
  'layer-count-chosen': 'layer count chosen by the picks’ misfit',
  'method-not-available': 'method asked for not available; plus-minus used',
  'method-unavailable': 'method asked for not available; plus-minus used',
  'time-term-failed': 'time terms could not be solved; plus-minus used',
  'time-term-two-layer-only': 'second refractor: time terms not used, plus-minus instead',
  'elevation-missing': 'elevations missing: flat datum assumed',
  'refractor-not-seen': 'a refractor was not seen',
  'second-refractor-one-way': 'second refractor seen one way only',
  'second-refractor-not-mapped': 'second refractor not mapped',
  'second-refractor-not-found': 'second refractor not found',
  'second-refractor-no-velocity': 'second refractor: no velocity',
  'second-refractor-no-first-depth': 'second refractor: no first-refractor depth',
  'second-refractor-no-coverage': 'second refractor: no coverage in places',
  'second-refractor-above-first': 'second refractor above the first in places',
  'shot-without-picks': 'a shot without picks',
};

function firstSentence(message: string): string {
  const sentence = (message.split(/(?<=[.;:])\s/)[0] ?? message).replace(/[.;:]$/, '');
  return sentence.length > 90 ? `${sentence.slice(0, 89)}…` : sentence;
}

function metres(x: number): string {
  return Math.abs(x) >= 10_000 ? groupThousands(x) : String(Math.round(x * 10) / 10);
}

/**
 * The end of a phrase that points at how the section draws it: true on the section, wrong on
 * the time–distance plot, which draws no refractor.
 */
const SECTION_HINTS: Readonly<Record<string, string>> = {
  'hidden-layer': ' (deepest limit drawn dash-dot)',
  'no-coverage': ' (hatched)',
  'first-refractor-interpolated': ' (dotted)',
  'delay-from-intercepts': ' (dashed)',
};

/** Which drawing the phrases are for: the section (default) names how it draws each warning. */
export interface WarningWordsOptions {
  onSection?: boolean;
}

/** "hidden layer … at 0–46 m (3×)": one phrase per code, in the order the codes first appear. */
export function warningPhrases(warnings: readonly Warning[], options: WarningWordsOptions = {}): string[] {
  const onSection = options.onSection ?? true;
  const byCode = new Map<string, Warning[]>();
  for (const w of warnings) {
    const list = byCode.get(w.code);
    if (list) list.push(w);
    else byCode.set(w.code, [w]);
  }
  const phrases: string[] = [];
  for (const [code, list] of byCode) {
    const hint = SECTION_HINTS[code];
    const words = PHRASES[code];
    let phrase = words === undefined ? firstSentence(list[0].message) : !onSection && hint !== undefined && words.endsWith(hint) ? words.slice(0, -hint.length) : words;
    const xs = list.map((w) => w.x).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
    if (xs.length === 1) phrase += ` at ${metres(xs[0])} m`;
    else if (xs.length > 1) phrase += ` at ${metres(Math.min(...xs))}–${metres(Math.max(...xs))} m`;
    if (list.length > 1) phrase += ` (${list.length}×)`;
    phrases.push(phrase);
  }
  return phrases;
}

/** The sentence for the title block: "Warnings: a; b; c." or "No warnings." */
export function warningSummary(warnings: readonly Warning[], options: WarningWordsOptions = {}): string {
  const phrases = warningPhrases(warnings, options);
  if (phrases.length === 0) return 'No warnings from the checks.';
  return `Warnings: ${phrases.join('; ')}.`;
}
