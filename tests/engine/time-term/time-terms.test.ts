/**
 * Time-term inversion (engine/time-term/time-terms.ts; Scheidegger & Willmore 1957,
 * Willmore & Bancroft 1960):
 * - the structured solve equals the straightforward dense least-squares fit of the same
 *   rows (engine/structure/least-squares.ts): unknowns and the diagonal of (AᵀA)⁻¹;
 * - on rolling lines of overlapping spreads over planar refractors with closed-form
 *   head-wave times (Kearey, Brooks & Hill 2002, ch. 5), the model comes back: refractor
 *   velocity, and depths from the time terms (z = a·V1/cos ic, as plus-minus converts a
 *   delay time) within 5 %; with seeded 0.3 ms noise the residual RMS is near the noise.
 */
import { describe, expect, it } from 'vitest';
import { invertTimeTerms, type TimeTermObservation } from '../../../engine/time-term/time-terms.js';
import { leastSquares } from '../../../engine/structure/least-squares.js';
import { normalDepthFromDelayM } from '../../../engine/plus-minus/plus-minus.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

const V1 = 600;
const V2 = 2400;

/** Head-wave time over a planar refractor of normal depths zA, zB under the two ends (Kearey, Brooks & Hill 2002, eq. 5.17 form): x/V2 + (zA + zB)·cos(ic)/V1, ms. */
function headWaveMs(x: number, zA: number, zB: number): number {
  const cosIc = Math.sqrt(1 - (V1 / V2) ** 2);
  return 1000 * (x / V2 + ((zA + zB) * cosIc) / V1);
}

/** A rolling line: geophones every `spacing` m, shots at geophones or between them, each recorded by `live` geophones around it; head-wave picks beyond the crossover. */
function rollingLine(opts: { geophones: number; spacing: number; shots: number; live: number; depthAt: (x: number) => number; noiseMs?: number; seed?: number; shotsBetween?: boolean }) {
  const rng = mulberry32(opts.seed ?? 1);
  const gx = Array.from({ length: opts.geophones }, (_, j) => j * opts.spacing);
  const last = gx[gx.length - 1];
  const sx = Array.from({ length: opts.shots }, (_, i) => {
    const at = Math.round((i * (opts.geophones - 1)) / (opts.shots - 1)) * opts.spacing;
    return opts.shotsBetween && i > 0 && i < opts.shots - 1 ? at + opts.spacing / 2 : at;
  });
  const crossover = 2 * opts.depthAt(0) * Math.sqrt((V2 + V1) / (V2 - V1)) + 2 * opts.spacing;
  const observations: TimeTermObservation[] = [];
  sx.forEach((s, i) => {
    gx.forEach((g, j) => {
      const offset = Math.abs(g - s);
      if (offset < crossover || Math.abs(j * opts.spacing - s) > (opts.live / 2) * opts.spacing) return;
      const t = headWaveMs(offset, opts.depthAt(s), opts.depthAt(g)) + (opts.noiseMs ?? 0) * gaussian(rng);
      observations.push({ shot: i, geophone: j, timeMs: Math.round(t * 100) / 100 });
    });
  });
  void last;
  return { gx, sx, observations };
}

describe('time terms: the structured solve is the least-squares fit', () => {
  it('equals the dense normal-equations solve of the same rows: unknowns and diag((AᵀA)⁻¹) to 1e-9 relative', () => {
    const line = rollingLine({ geophones: 30, spacing: 2, shots: 5, live: 60, depthAt: (x) => 5 + 0.03 * x, noiseMs: 0.3, seed: 7, shotsBetween: true });
    const out = invertTimeTerms({ geophoneXsM: line.gx, shotXsM: line.sx, observations: line.observations, pickSigmaMs: 0.3 });
    expect(out.ok).toBe(true);
    if (!out.ok) return;
    // The same model written out densely: columns = used geophones, then own shot terms, then slowness.
    const usedGeophones = [...new Set(line.observations.map((o) => o.geophone))];
    // Tie neighbours of shots between geophones also get columns.
    const gcol = new Map<number, number>();
    const col = (j: number): number => (gcol.has(j) ? gcol.get(j)! : (gcol.set(j, gcol.size), gcol.size - 1));
    usedGeophones.forEach(col);
    const shotAt = line.sx.map((s) => line.gx.findIndex((g) => Math.abs(g - s) < 1e-3));
    const tieRows: number[][] = [];
    const ownShot = new Map<number, number>();
    const pending: { shot: number; a: number; b: number; wb: number }[] = [];
    line.sx.forEach((s, i) => {
      if (shotAt[i] >= 0) col(shotAt[i]);
      else {
        const b = line.gx.findIndex((g) => g > s);
        pending.push({ shot: i, a: b - 1, b, wb: (s - line.gx[b - 1]) / (line.gx[b] - line.gx[b - 1]) });
        col(b - 1);
        col(b);
      }
    });
    line.sx.forEach((_, i) => {
      if (shotAt[i] < 0) ownShot.set(i, gcol.size + ownShot.size);
    });
    const n = gcol.size + ownShot.size + 1;
    const slow = n - 1;
    const shotColumn = (i: number): number => (shotAt[i] >= 0 ? gcol.get(shotAt[i])! : ownShot.get(i)!);
    const rows = line.observations.map((o) => {
      const r = new Array<number>(n).fill(0);
      r[shotColumn(o.shot)] += 1;
      r[gcol.get(o.geophone)!] += 1;
      r[slow] = Math.abs(line.gx[o.geophone] - line.sx[o.shot]);
      return r;
    });
    const y = line.observations.map((o) => o.timeMs);
    for (const p of pending) {
      const r = new Array<number>(n).fill(0);
      r[ownShot.get(p.shot)!] = 1;
      r[gcol.get(p.a)!] = -(1 - p.wb);
      r[gcol.get(p.b)!] = -p.wb;
      tieRows.push(r);
    }
    const dense = leastSquares([...rows, ...tieRows], [...y, ...tieRows.map(() => 0)]);
    expect(dense).not.toBeNull();
    const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(b)));
    for (const [j, c] of gcol) close(out.geophoneTermMs[j]!, dense!.coefficients[c]);
    close(1000 / out.segments[0].velocityMPerS, dense!.coefficients[slow]);
    const sigma = out.sigmaMs;
    for (const [j, c] of gcol) close(out.geophoneTermSigmaMs[j]!, sigma * Math.sqrt(dense!.unscaledCovariance[c][c]));
    for (const [i, c] of ownShot) close(out.shotTermSigmaMs[i], sigma * Math.sqrt(dense!.unscaledCovariance[c][c]));
  });
});

describe('time terms recover rolling lines of overlapping spreads (closed-form head waves)', () => {
  const cases = [
    { name: 'flat refractor 6 m down, 96 geophones at 2 m, 12 shots at geophones, 48 live', depthAt: () => 6, shotsBetween: false },
    { name: 'refractor dipping from 5 to 9 m over 190 m, shots between geophones', depthAt: (x: number) => 5 + (4 * x) / 190, shotsBetween: true },
    { name: 'undulating refractor 6 ± 1.5 m', depthAt: (x: number) => 6 + 1.5 * Math.sin(x / 25), shotsBetween: false },
  ];
  for (const c of cases) {
    it(`${c.name}: V2 within 1 %, depths within 5 %, residuals at the 0.01 ms rounding`, () => {
      const line = rollingLine({ geophones: 96, spacing: 2, shots: 12, live: 48, depthAt: c.depthAt, shotsBetween: c.shotsBetween });
      const out = invertTimeTerms({ geophoneXsM: line.gx, shotXsM: line.sx, observations: line.observations, pickSigmaMs: 0.3 });
      expect(out.ok).toBe(true);
      if (!out.ok) return;
      expect(Math.abs(out.segments[0].velocityMPerS - V2) / V2).toBeLessThan(0.01);
      let checked = 0;
      out.geophoneTermMs.forEach((t, j) => {
        if (t === null) return;
        const z = normalDepthFromDelayM(t, V1, V2)!;
        const truth = c.depthAt(line.gx[j]);
        expect(Math.abs(z - truth) / truth).toBeLessThan(0.05);
        checked++;
      });
      expect(checked).toBeGreaterThan(80);
      expect(out.rmsMs).toBeLessThan(c.name.startsWith('flat') ? 0.01 : 0.1);
    });
  }

  it('with seeded 0.3 ms pick noise: residual RMS within 20 % of the noise, depths within 5 % in the median, σ of the time terms from the fit', () => {
    const line = rollingLine({ geophones: 96, spacing: 2, shots: 12, live: 48, depthAt: () => 6, noiseMs: 0.3, seed: 11 });
    const out = invertTimeTerms({ geophoneXsM: line.gx, shotXsM: line.sx, observations: line.observations, pickSigmaMs: 0.3 });
    expect(out.ok).toBe(true);
    if (!out.ok) return;
    // RMS of residuals ≈ σ·√((m − n)/m) for m picks and n unknowns.
    const expected = 0.3 * Math.sqrt((out.count - out.unknowns) / out.count);
    expect(Math.abs(out.rmsMs - expected) / expected).toBeLessThan(0.2);
    const errors = out.geophoneTermMs.flatMap((t) => (t === null ? [] : [Math.abs(normalDepthFromDelayM(t, V1, V2)! - 6) / 6])).sort((a, b) => a - b);
    expect(errors[errors.length >> 1]).toBeLessThan(0.05);
    const sigmas = out.geophoneTermSigmaMs.filter((s): s is number => s !== null);
    expect(Math.min(...sigmas)).toBeGreaterThan(0);
    // Most geophones are seen by several shots: their time terms are known better than one pick.
    expect([...sigmas].sort((a, b) => a - b)[sigmas.length >> 1]).toBeLessThan(0.3);
  });

  it('refuses a line whose shots are all off the spread: shot and geophone terms can trade, named in the reason', () => {
    const gx = Array.from({ length: 20 }, (_, j) => j * 2);
    const sx = [-30, 68];
    const observations: TimeTermObservation[] = [];
    sx.forEach((s, i) => gx.forEach((g, j) => observations.push({ shot: i, geophone: j, timeMs: headWaveMs(Math.abs(g - s), 6, 6) })));
    const out = invertTimeTerms({ geophoneXsM: gx, shotXsM: sx, observations, pickSigmaMs: 0.3 });
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.reason).toMatch(/trade/);
  });
});
