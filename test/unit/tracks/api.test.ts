import { beforeAll, describe, expect, it } from 'vitest';
import { POST as routePOST } from '@/app/api/v1/tracks/metrics/route';
import { signed, unitDatabase } from '../../support/auth';
import { handleTrackMetrics, trackQuerySchema } from '@/server/api/tracks';
import { syntheticTrack } from './synthetic';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

const track = syntheticTrack({
  hops: [
    { apexHeight: 0.15, vx: 0.2, vy: 0, stanceBefore: 0.2 },
    { apexHeight: 0.1, vx: 0.2, vy: 0, stanceBefore: 0.1 },
  ],
  sampleRate: 400,
  lengthScale: 1000,
});
const base = 'time=time&x=pos_x&y=pos_y&z=pos_z&lengthUnit=mm&timeUnit=s';

describe('tracks API', () => {
  it('turns query strings into numbers and leaves blanks absent', () => {
    const q = trackQuerySchema.parse({ time: 't', x: 'x', y: 'y', z: 'z', lengthUnit: 'mm', timeUnit: 'ms', massGrams: '1.2', targetX: '' });
    expect(q.massGrams).toBe(1.2);
    expect(q.targetX).toBeUndefined();
  });

  it('answers hops in SI units for a CSV body', () => {
    const r = handleTrackMetrics(track.csv, new URLSearchParams(`${base}&massGrams=1.1&energyJoules=0.4&targetX=500&targetY=200`));
    expect(r.hops).toHaveLength(2);
    expect(r.hops[0]!.apexHeight).toBeCloseTo(0.15, 3);
    expect(r.hops[1]!.landingError).toBeGreaterThan(0);
    expect(r.summary.costOfTransport).toBeGreaterThan(0);
  });

  it('names the field of a bad query value', () => {
    expect(() => handleTrackMetrics(track.csv, new URLSearchParams(`${base}&massGrams=heavy`))).toThrow(/massGrams/);
    expect(() => handleTrackMetrics(track.csv, new URLSearchParams('time=time&x=pos_x&y=pos_y&z=pos_z&lengthUnit=in&timeUnit=s'))).toThrow(/lengthUnit/);
    expect(() => handleTrackMetrics(track.csv, new URLSearchParams('x=pos_x&y=pos_y&z=pos_z&lengthUnit=m&timeUnit=s'))).toThrow(/time/);
    expect(() => handleTrackMetrics('  ', new URLSearchParams(base))).toThrow(/empty/);
  });

  it('takes orientation columns from the query and names a missing one', () => {
    const [head, ...rows] = track.csv.trim().split('\n');
    const csv = [`${head},r,p`, ...rows.map((row) => `${row},0,2`)].join('\n');
    const r = handleTrackMetrics(csv, new URLSearchParams(`${base}&roll=r&pitch=p&angleUnit=deg`));
    expect(r.hops[0]!.landedTiltDeg).toBeCloseTo(2, 6);
    expect(() => handleTrackMetrics(csv, new URLSearchParams(`${base}&roll=r`))).toThrow(/pitch/);
    expect(() => handleTrackMetrics(csv, new URLSearchParams(`${base}&qw=r&qx=p`))).toThrow(/qy/);
    expect(() => handleTrackMetrics(csv, new URLSearchParams(`${base}&roll=r&pitch=p`))).toThrow(/angleUnit/);
  });

  it('the route answers 200 with JSON, and 400 naming the field', async () => {
    const ok = await POST(new Request(`http://localhost/api/v1/tracks/metrics?${base}`, { method: 'POST', body: track.csv }));
    expect(ok.status).toBe(200);
    const body = (await ok.json()) as { hops: unknown[]; summary: { hopCount: number }; warnings: string[] };
    expect(body.summary.hopCount).toBe(2);
    const bad = await POST(new Request(`http://localhost/api/v1/tracks/metrics?${base.replace('pos_z', 'height')}`, { method: 'POST', body: track.csv }));
    expect(bad.status).toBe(400);
    const err = (await bad.json()) as { error: { field: string; message: string } };
    expect(err.error.field).toBe('z');
    expect(err.error.message).toMatch(/height/);
  });
});
