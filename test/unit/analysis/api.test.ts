import { beforeAll, describe, expect, it } from 'vitest';
import { POST as routePOST } from '@/app/api/v1/analyses/route';
import { signed, unitDatabase } from '../../support/auth';
import { handleAnalysisRequest } from '@/server/api/analyses';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

function post(body: unknown): Promise<Response> {
  return POST(new Request('http://localhost/api/v1/analyses', { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }));
}

const data = [
  { payload: -1, gain: -1, eff: 0.28 }, { payload: 1, gain: -1, eff: 0.36 },
  { payload: -1, gain: 1, eff: 0.18 }, { payload: 1, gain: 1, eff: 0.31 },
  { payload: 0, gain: 0, eff: 0.29 }, { payload: 0, gain: 0, eff: 0.31 },
];

describe('POST /api/v1/analyses', () => {
  it('answers coefficients, ANOVA and fit statistics', async () => {
    const res = await post({ data, response: 'eff', terms: ['payload', 'gain'] });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { coefficients: { term: string; estimate: number; ci95: number[] }[]; anova: { source: string }[]; rSquared: number; residualDf: number };
    expect(body.coefficients.map((c) => c.term)).toEqual(['(Intercept)', 'payload', 'gain']);
    expect(body.coefficients[1]!.estimate).toBeCloseTo(0.0525, 12);
    expect(body.anova.at(-1)!.source).toBe('Total');
    expect(body.residualDf).toBe(3);
    expect(body.rSquared).toBeGreaterThan(0.5);
  });

  it('answers 400 naming the field for a malformed request or term', async () => {
    let res = await post({ data, response: 'eff' });
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { field: string } }).error.field).toBe('terms');
    res = await post({ data, response: 'eff', terms: ['payload^'] });
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { field: string } }).error.field).toBe('terms[0]');
    res = await post({ data, response: 'eff', terms: ['payload'], coding: 'log' });
    expect(res.status).toBe(400);
  });

  it('validates through the handler used by the route', () => {
    expect(() => handleAnalysisRequest({ data: [], response: 'eff', terms: [] })).toThrow(/at least one run/);
  });
});
