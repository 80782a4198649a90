import { beforeAll, describe, expect, it } from 'vitest';
import { POST as routePOST } from '@/app/api/v1/designs/route';
import { signed, unitDatabase } from '../../support/auth';
import { handleDesignRequest } from '@/server/api/designs';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

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

describe('POST /api/v1/designs: optimal and split-plot requests', () => {
  it('builds a split-plot optimal design with hard-to-change surface as whole-plot factor', async () => {
    const res = await post({
      factors: [
        { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass', 'soil'], hardToChange: true },
        { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
        { name: 'gain', kind: 'continuous', low: 10, high: 30 },
      ],
      method: 'optimal',
      model: 'main-effects',
      runs: 12,
      wholePlots: 4,
      starts: 3,
      seed: 9,
      constraints: [{ terms: { payload: 1, gain: 0.02 }, max: 2.4 }],
      existingRuns: [{ surface: 'ice', payload: 1, gain: 20 }],
    });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { runs: { values: Record<string, number | string>; wholePlot?: number; existing?: boolean }[] };
    expect(body.runs).toHaveLength(13);
    expect(body.runs[0]!.existing).toBe(true);
    for (const r of body.runs) expect((r.values.payload as number) + 0.02 * (r.values.gain as number)).toBeLessThanOrEqual(2.4 + 1e-9);
    expect(new Set(body.runs.slice(1).map((r) => r.wholePlot))).toEqual(new Set([1, 2, 3, 4]));
  });

  it('answers 400 naming blocks or whole plots on methods that do not take them, and 422 naming inestimable terms', async () => {
    const blocked = await post({ factors, method: 'sobol', blocks: 2 });
    expect(blocked.status).toBe(400);
    expect(((await blocked.json()) as { error: { field: string } }).error.field).toBe('blocks');
    const plots = await post({ factors, method: 'full-factorial', wholePlots: 2 });
    expect(((await plots.json()) as { error: { field: string } }).error.field).toBe('wholePlots');
    const singular = await post({
      factors: [
        { name: 'a', kind: 'continuous', low: 0, high: 1 },
        { name: 'b', kind: 'continuous', low: 0, high: 1 },
        { name: 'c', kind: 'continuous', low: 0, high: 1 },
        { name: 'd', kind: 'continuous', low: 0, high: 1 },
      ],
      method: 'fractional-factorial',
      resolution: 4,
      model: 'interactions',
    });
    expect(singular.status).toBe(422);
    const body = (await singular.json()) as { error: { code: string; details: { inestimable: string[] } } };
    expect(body.error.code).toBe('singular_design');
    expect(body.error.details.inestimable.length).toBeGreaterThan(0);
  });
});

describe('POST /api/v1/designs: block generators named in the request', () => {
  const five = ['payload', 'gain', 'stiffness', 'crouch', 'stride'].map((name) => ({ name, kind: 'continuous', low: 0, high: 1 }));

  it('answers the blocks the generators give, with the generators and the confounded effects in the diagnostics', async () => {
    const res = await post({ factors: five, method: 'full-factorial', blockGenerators: ['ABC', 'CDE'], seed: 3 });
    expect(res.status).toBe(200);
    const body = (await res.json()) as {
      runs: { coded: number[]; block: number }[];
      diagnostics: { blocking: { blocks: number; generators: string[]; confounded: { effect: string }[] } };
    };
    expect(body.diagnostics.blocking.blocks).toBe(4);
    expect(body.diagnostics.blocking.generators).toEqual(['payload*gain*stiffness', 'stiffness*crouch*stride']);
    expect(body.diagnostics.blocking.confounded.map((c) => c.effect).sort()).toEqual(['payload*gain*crouch*stride', 'payload*gain*stiffness', 'stiffness*crouch*stride']);
    for (const r of body.runs) {
      const abc = r.coded[0]! * r.coded[1]! * r.coded[2]!;
      const cde = r.coded[2]! * r.coded[3]! * r.coded[4]!;
      expect(r.block).toBe(1 + (abc < 0 ? 1 : 0) + (cde < 0 ? 2 : 0));
    }
  });

  it('answers 400 naming blockGenerators for bad words, dependent words, lost effects and a disagreeing blocks', async () => {
    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ blockGenerators: ['ABZ'] }, 'blockGenerators[0]', /not one of the factor letters/],
      [{ blockGenerators: ['ABC', 'CDE', 'ABDE'] }, 'blockGenerators[2]', /product of the other block generators/],
      [{ blockGenerators: ['ABC', 'AB'] }, 'blockGenerators', /main effect stiffness/],
      [{ blockGenerators: ['ABC', 'ABD'], model: 'interactions' }, 'blockGenerators', /two-factor interaction stiffness\*crouch/],
      [{ blockGenerators: ['ABC', 'CDE'], blocks: 2 }, 'blockGenerators', /but blocks is 2/],
      [{ blockGenerators: 'ABC' }, 'blockGenerators', /.+/],
    ];
    for (const [extra, field, message] of cases) {
      const res = await post({ factors: five, method: 'full-factorial', model: 'main-effects', ...extra });
      expect(res.status).toBe(400);
      const json = (await res.json()) as { error: { field: string; message: string } };
      expect(json.error.field).toBe(field);
      expect(json.error.message).toMatch(message);
    }
  });
});
