/**
 * Demo A as seismograph files: one SEG-2 file per shot of the demo line (demo-lines.ts),
 * so the page and scripts can try the gather routes without a seismograph. Invented data:
 * each trace is the forward model's first arrival (and the later of direct and head wave)
 * as a Ricker wavelet plus seeded Gaussian noise (engine/forward/synthetic-gather.ts), over
 * the same closed-form planar refractor and ground that made the demo's picks (Kearey,
 * Brooks & Hill 2002, ch. 5). Written by the project's own writer (engine/seg2/write.ts).
 *
 * Recording choices (ours, typical of an engineering seismograph): 0.25 ms sampling,
 * 512 samples, 10 ms of pre-trigger samples (DELAY −0.010 s), 100 Hz wavelet, SNR 20,
 * 32-bit floats big-endian (format 4, the samples rounded to float32 before writing so the
 * file holds exactly what was made). Geometry in RECEIVER_LOCATION / SOURCE_LOCATION as
 * "x 0 elevation" in METERS, which engine/seg2/gather.ts reads back.
 */
import { syntheticGather } from '../forward/synthetic-gather.js';
import { writeSeg2 } from '../seg2/write.js';
import type { Seg2File } from '../seg2/types.js';
import { demoLineModel } from './demo-lines.js';

export const DEMO_GATHER_RECORDING = {
  sampleIntervalMs: 0.25,
  samples: 512,
  delayMs: -10,
  peakFrequencyHz: 100,
  snr: 20,
} as const;

export interface DemoGather {
  shotId: string;
  /** File name under samples/, e.g. "demo-line-W-off.sg2". */
  fileName: string;
  bytes: Uint8Array;
  /** The model's exact first arrivals at each geophone, ms after the shot (unrounded). */
  firstArrivalsMs: number[];
}

/** Seconds as the file writes them (no exponent notation, no float noise). */
function seconds(ms: number): string {
  return String(Number((ms / 1000).toFixed(9)));
}

/** The demo line's gathers, one per shot, in the shot order of demoLine(). O(shots × geophones × samples). */
export function demoGathers(): DemoGather[] {
  const model = demoLineModel();
  const rec = DEMO_GATHER_RECORDING;
  const geophones = model.geophoneXsM.map((x) => ({ x, elevation: model.groundElevationM(x) }));
  return model.shots.map((shot, s) => {
    const source = { x: shot.xM, elevation: model.groundElevationM(shot.xM) };
    const { traces, firstArrivalsMs } = syntheticGather({
      model: model.refractor,
      shot: source,
      geophones,
      sampleIntervalMs: rec.sampleIntervalMs,
      samples: rec.samples,
      delayMs: rec.delayMs,
      peakFrequencyHz: rec.peakFrequencyHz,
      snr: rec.snr,
      // A fixed seed per shot, so `npm run samples` always writes the same bytes.
      seed: 7001 + s,
    });
    const file: Seg2File = {
      littleEndian: false,
      revision: 1,
      strings: [
        { keyword: 'UNITS', value: 'METERS' },
        { keyword: 'SHOT_SEQUENCE_NUMBER', value: String(s + 1) },
        { keyword: 'NOTE', value: `Arcline demo A, shot ${shot.id}: invented data from a forward model, not a field record.` },
      ],
      traces: traces.map((samples, i) => ({
        format: 4,
        samples: samples.map(Math.fround),
        strings: [
          { keyword: 'CHANNEL_NUMBER', value: String(i + 1) },
          { keyword: 'SAMPLE_INTERVAL', value: seconds(rec.sampleIntervalMs) },
          { keyword: 'DELAY', value: seconds(rec.delayMs) },
          { keyword: 'RECEIVER_LOCATION', value: `${geophones[i].x} 0 ${geophones[i].elevation}` },
          { keyword: 'SOURCE_LOCATION', value: `${source.x} 0 ${source.elevation}` },
        ],
      })),
    };
    return { shotId: shot.id, fileName: `demo-line-${shot.id}.sg2`, bytes: writeSeg2(file), firstArrivalsMs };
  });
}
