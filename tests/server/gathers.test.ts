// POST /api/v1/gathers/picks: a SEG-2 gather (written by engine/seg2/write.ts from a
// synthetic gather over the closed-form planar refractor) in, the contract's gather picks
// out (api-v1.md: shot, geophones, sampleIntervalMs, times, confidence); broken files
// answer 400 invalid_seg2 naming the byte offset; geometry from query parameters.
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { writeSeg2 } from '../../engine/seg2/write.js';
import { syntheticGather } from '../../engine/forward/synthetic-gather.js';
import { spec } from '../helpers/picker-lines.js';
import { memoryApp } from '../helpers/memory-app.js';

const server = memoryApp();

const s = spec(-20, 30, 42);
const { traces, firstArrivalsMs } = syntheticGather(s);

/** The synthetic gather as a SEG-2 file of 32-bit floats; `geometry: false` leaves out the locations. */
function gatherFile(geometry = true): Buffer {
  const bytes = writeSeg2({
    littleEndian: false,
    revision: 1,
    strings: [{ keyword: 'UNITS', value: 'METERS' }, { keyword: 'ACQUISITION_DATE', value: '07/MAR/2024' }],
    traces: traces.map((samples, i) => ({
      format: 4,
      samples: samples.map(Math.fround),
      strings: [
        { keyword: 'CHANNEL_NUMBER', value: String(i + 1) },
        { keyword: 'SAMPLE_INTERVAL', value: '0.00025' },
        { keyword: 'DELAY', value: '-0.010' },
        ...(geometry ? [{ keyword: 'RECEIVER_LOCATION', value: `${s.geophones[i].x} 0 0` }, { keyword: 'SOURCE_LOCATION', value: '-20 0 0' }] : []),
      ],
    })),
  });
  return Buffer.from(bytes);
}

const post = (body: Buffer, query = '', type = 'application/octet-stream') =>
  request(server.app.server).post(`/api/v1/gathers/picks${query}`).set('Content-Type', type).serialize((b: Buffer) => b as unknown as string).send(body);

describe('POST /api/v1/gathers/picks', () => {
  it('answers the contract’s gather picks, geometry from the header strings, times shifted by DELAY', async () => {
    const res = await post(gatherFile());
    expect(res.status).toBe(200);
    expect(res.body.shot).toEqual({ x: -20, elevation: 0 });
    expect(res.body.geophones).toHaveLength(48);
    expect(res.body.geophones[5]).toEqual({ x: 10, elevation: 0 });
    expect(res.body.sampleIntervalMs).toBe(0.25);
    expect(res.body.delayMs).toBeCloseTo(-10, 9);
    expect(res.body.acquisition.date).toBe('07/MAR/2024');
    expect(res.body.times).toHaveLength(48);
    expect(res.body.confidence).toHaveLength(48);
    // Against the closed-form first arrivals at SNR 30 (README, pick accuracy: median 0.76
    // samples, largest 5): median within one sample (0.25 ms), every pick within 5 (1.25 ms).
    const errors = res.body.times.map((t: number, i: number) => Math.abs(t - firstArrivalsMs[i])).sort((a: number, b: number) => a - b);
    expect(errors[24]).toBeLessThanOrEqual(0.25);
    expect(errors[47]).toBeLessThanOrEqual(1.25);
    res.body.confidence.forEach((c: number) => expect(c).toBeGreaterThan(0.5));
  });

  it('takes the geometry from query parameters when the file lacks it', async () => {
    const bare = gatherFile(false);
    const refused = await post(bare);
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('invalid_seg2');
    expect(refused.body.error.message).toContain('geophoneX0 and geophoneSpacing');
    // The missing header named, and the parameter that supplies it as the path (what the page asks for).
    expect(refused.body.error.message).toContain('RECEIVER_LOCATION');
    expect(refused.body.error.path).toBe('/geophoneX0');
    const noShot = await post(bare, '?geophoneX0=0&geophoneSpacing=2');
    expect(noShot.status).toBe(400);
    expect(noShot.body.error.message).toContain('SOURCE_LOCATION');
    expect(noShot.body.error.path).toBe('/shotX');
    const res = await post(bare, '?shotX=-20&geophoneX0=0&geophoneSpacing=2');
    expect(res.status).toBe(200);
    expect(res.body.geophones[47].x).toBe(94);
    expect(Math.abs(res.body.times[47] - firstArrivalsMs[47])).toBeLessThanOrEqual(1.25);
  });

  it('a truncated file answers 400 invalid_seg2 naming the byte offset', async () => {
    const file = gatherFile();
    const cut = file.subarray(0, file.length - 100);
    const res = await post(cut);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_seg2');
    expect(res.body.error.byteOffset).toBe(cut.length);
    expect(res.body.error.message).toContain(`byte ${cut.length}`);
    expect(res.body.error.path).toBe('');
  });

  it('a bad query parameter answers 400 naming it', async () => {
    const res = await post(gatherFile(), '?sampleIntervalMs=-1');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('sampleIntervalMs');
  });

  it('the file sent as JSON is named as SEG-2 and pointed here with the media type to use', async () => {
    const res = await post(gatherFile(), '', 'application/json');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('seg2_file');
    expect(res.body.error.message).toContain('application/octet-stream');
  });

  it('other routes still refuse octet-stream bodies', async () => {
    const res = await request(server.app.server).post('/api/v1/interpretations').set('Content-Type', 'application/octet-stream').serialize((b: Buffer) => b as unknown as string).send(gatherFile());
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('seg2_file');
  });
});
