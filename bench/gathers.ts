/**
 * Reading and picking SEG-2 gathers at the size issue 12 names: 48 traces × 4,000 samples
 * × 11 shots. The files are made once by the project's writer (engine/seg2/write.ts, 32-bit
 * floats) from synthetic gathers over a planar refractor (engine/forward/synthetic-gather.ts,
 * SNR 20, 0.25 ms sampling, 10 ms pre-trigger); shots every 9.4 m from −10 m to 84 m over
 * 48 geophones at 2 m. Timed: reading alone (gatherFromSeg2) and reading + picking
 * (gatherPicksFromSeg2, what POST /api/v1/gathers/picks runs in a worker), each over the
 * 11 files, median of 5 passes after one warm-up, in this thread. Also the pick error
 * against the closed-form arrivals, so a fast but wrong picker shows.
 */
import { syntheticGather } from '../engine/forward/synthetic-gather.js';
import { writeSeg2 } from '../engine/seg2/write.js';
import { gatherFromSeg2 } from '../engine/seg2/gather.js';
import { gatherPicksFromSeg2 } from '../engine/picking/gather-picks.js';

const TRACES = 48;
const SAMPLES = 4000;
const SHOTS = 11;
const DT_MS = 0.25;
const DELAY_MS = -10;

function benchFiles(): { bytes: Uint8Array; truth: number[] }[] {
  const geophones = Array.from({ length: TRACES }, (_, i) => ({ x: 2 * i, elevation: 0 }));
  const model = { v1: 600, v2: 2400, refractorElevationAtZero: -6, dipDegrees: 3 };
  return Array.from({ length: SHOTS }, (_, s) => {
    const shotX = -10 + s * 9.4;
    const { traces, firstArrivalsMs } = syntheticGather({
      model, shot: { x: shotX, elevation: 0 }, geophones, sampleIntervalMs: DT_MS, samples: SAMPLES, delayMs: DELAY_MS, peakFrequencyHz: 100, snr: 20, seed: 500 + s,
    });
    const bytes = writeSeg2({
      littleEndian: true,
      revision: 1,
      strings: [{ keyword: 'UNITS', value: 'METERS' }],
      traces: traces.map((samples, i) => ({
        format: 4,
        samples: samples.map(Math.fround),
        strings: [
          { keyword: 'SAMPLE_INTERVAL', value: String(DT_MS / 1000) },
          { keyword: 'DELAY', value: String(DELAY_MS / 1000) },
          { keyword: 'RECEIVER_LOCATION', value: String(geophones[i].x) },
          { keyword: 'SOURCE_LOCATION', value: String(shotX) },
        ],
      })),
    });
    return { bytes, truth: firstArrivalsMs };
  });
}

function medianOf(values: number[]): number {
  const sorted = values.slice().sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

export function gatherBench(): void {
  const files = benchFiles();
  const megabytes = files.reduce((sum, f) => sum + f.bytes.length, 0) / 2 ** 20;
  const pass = (work: (bytes: Uint8Array) => unknown): number => {
    const t0 = performance.now();
    for (const f of files) work(f.bytes);
    return performance.now() - t0;
  };
  const read = (bytes: Uint8Array) => gatherFromSeg2(bytes);
  const readAndPick = (bytes: Uint8Array) => gatherPicksFromSeg2(bytes);
  pass(read);
  pass(readAndPick);
  const readMs: number[] = [];
  const pickMs: number[] = [];
  for (let r = 0; r < 5; r++) {
    readMs.push(pass(read));
    pickMs.push(pass(readAndPick));
  }
  const errors: number[] = [];
  for (const f of files) {
    const out = gatherPicksFromSeg2(f.bytes);
    if (out.ok) out.picks.times.forEach((t, i) => { if (t !== null) errors.push(Math.abs(t - f.truth[i]) / DT_MS); });
  }
  const all = medianOf(pickMs);
  const onlyRead = medianOf(readMs);
  console.log(
    `SEG-2 read + pick, ${SHOTS} shots × ${TRACES} traces × ${SAMPLES} samples (${megabytes.toFixed(1)} MB): ` +
      `${(all / SHOTS).toFixed(1)} ms per gather, ${(all / (SHOTS * TRACES)).toFixed(3)} ms per trace (wall median of 5 passes; all 11 in ${all.toFixed(0)} ms); ` +
      `reading alone ${(onlyRead / SHOTS).toFixed(1)} ms per gather; ` +
      `picks ${errors.length}/${SHOTS * TRACES}, median error ${medianOf(errors).toFixed(2)} samples, largest ${Math.max(...errors).toFixed(2)}`,
  );
}

// Run alone: npx tsx bench/gathers.ts
if (process.argv[1]?.endsWith('gathers.ts') || process.argv[1]?.endsWith('gathers.js')) gatherBench();
