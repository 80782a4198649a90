import { describe, expect, it } from 'vitest';
import { POST } from '@/app/api/v1/designs/route';
import { handleDesignRequest } from '@/server/api/designs';

const factors = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'ice'], hardToChange: true },
];

function post(body: unknown): Promise<Response> {
  return POST(new Request('http://localhost/api/v1/designs', { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }));
}

describe('POST /api/v1/designs', () => {
  it('answers runs in natural units with diagnostics', async () => {
    const res = await post({ factors, method: 'full-factorial', seed: 4 });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { runs: { order: number; values: Record<string, unknown> }[]; diagnostics: { dEfficiency: number } };
    expect(body.runs).toHaveLength(4);
    expect(body.runs.map((r) => r.order)).toEqual([1, 2, 3, 4]);
    expect(new Set(body.runs.map((r) => r.values.surface))).toEqual(new Set(['turf', 'ice']));
    expect(body.diagnostics.dEfficiency).toBeCloseTo(1, 12);
  });

  it('is the same function as the handler', () => {
    const a = handleDesignRequest({ factors, method: 'full-factorial', seed: 4 });
    const b = handleDesignRequest({ factors, method: 'full-factorial', seed: 4 });
    expect(a).toEqual(b);
  });

  it('answers 400 naming the field of a bad spec', async () => {
    const cases: [unknown, string][] = [
      [{ factors, method: 'magic' }, 'method'],
      [{ factors: [{ name: 'payload', kind: 'continuous', low: 0 }], method: 'full-factorial' }, 'factors[0].high'],
      [{ factors, method: 'full-factorial', centerPoints: -1 }, 'centerPoints'],
      [{ factors: [{ name: 'payload', kind: 'continuous', low: 2, high: 0 }], method: 'full-factorial' }, 'factors[0].high'],
      [{ factors, method: 'central-composite', alpha: 'sideways' }, 'alpha'],
    ];
    for (const [body, field] of cases) {
      const res = await post(body);
      expect(res.status).toBe(400);
      const json = (await res.json()) as { error: { field: string } };
      expect(json.error.field).toBe(field);
    }
  });

  it('answers 400 for malformed JSON and 422 for a design that breaks the constraints', async () => {
    const bad = await POST(new Request('http://localhost/api/v1/designs', { method: 'POST', body: '{"factors": [' }));
    expect(bad.status).toBe(400);
    const res = await post({
      factors: [
        { name: 'payload', kind: 'continuous', low: 0, high: 2 },
        { name: 'gain', kind: 'continuous', low: 10, high: 30 },
      ],
      method: 'full-factorial',
      constraints: [{ terms: { payload: 1, gain: 0.02 }, max: 2.4 }],
    });
    expect(res.status).toBe(422);
  });
});
