/**
 * POST /api/v1/analyses with wholePlot: the split-plot answer (contract fields, variance components,
 * Kenward–Roger denominator df per term) and 400s naming wholePlot. The numbers are checked against
 * statsmodels and the classical split-plot ANOVA in test/reference/analysis/split-plot-reml.test.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as routePOST } from '@/app/api/v1/analyses/route';
import { signed, unitDatabase } from '../../support/auth';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

function post(body: unknown): Promise<Response> {
  return POST(new Request('http://localhost/api/v1/analyses', { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }));
}

// Invented: 6 surface beds (whole plots, surface ±1), 4 runs each over payload ±1 and gain ±1.
const bedShift = [0.4, -0.3, 0.1, -0.5, 0.6, -0.2];
const data = Array.from({ length: 24 }, (_, i) => {
  const bed = Math.floor(i / 4);
  const surface = bed % 2 === 0 ? -1 : 1;
  const payload = i % 2 === 0 ? -1 : 1;
  const gain = Math.floor(i / 2) % 2 === 0 ? -1 : 1;
  return { bed: `B${bed + 1}`, surface, payload, gain, eff: 0.3 + 0.05 * surface + 0.02 * payload - 0.01 * gain + 0.05 * bedShift[bed]! + 0.004 * Math.sin(7.3 * i) };
});

interface Body {
  coefficients: { term: string; estimate: number; stdError: number; p: number; df: number }[];
  anova: { source: string; df: number; f: number; p: number; denominatorDf: number; stratum: string }[];
  varianceComponents: { wholePlot: number; residual: number };
  splitPlot: { wholePlots: number; wholePlotErrorDf: number; subplotErrorDf: number };
  rSquared: number;
  residualStdError: number;
  residualDf: number;
}

async function errorOf(res: Response) {
  return ((await res.json()) as { error: { code: string; field: string; message: string } }).error;
}

describe('POST /api/v1/analyses with a whole-plot column', () => {
  it('fits REML with a whole-plot random effect and Kenward–Roger df', async () => {
    const res = await post({ data, response: 'eff', terms: ['surface', 'payload', 'gain', 'surface*payload'], wholePlot: 'bed' });
    expect(res.status).toBe(200);
    const body = (await res.json()) as Body;
    expect(body.coefficients.map((c) => c.term)).toEqual(['(Intercept)', 'surface', 'payload', 'gain', 'surface*payload']);
    // Balanced: surface on 6 beds − 2 whole-plot parameters = 4 df; subplot terms on 24 − 5 − 4 = 15 df.
    const surface = body.anova.find((a) => a.source === 'surface')!;
    expect(surface.stratum).toBe('whole plot');
    expect(surface.denominatorDf).toBeCloseTo(4, 6);
    expect(body.anova.find((a) => a.source === 'payload')!.denominatorDf).toBeCloseTo(15, 6);
    expect(body.anova.find((a) => a.source === 'surface*payload')!.stratum).toBe('subplot');
    expect(body.coefficients.find((c) => c.term === 'surface')!.df).toBeCloseTo(4, 6);
    expect(body.splitPlot).toMatchObject({ wholePlots: 6, wholePlotErrorDf: 4, subplotErrorDf: 15 });
    expect(body.varianceComponents.wholePlot).toBeGreaterThan(0);
    expect(body.varianceComponents.residual).toBeGreaterThan(0);
    expect(body.residualStdError).toBeCloseTo(Math.sqrt(body.varianceComponents.residual), 12);
    expect(body.residualDf).toBe(15);
    expect(body.rSquared).toBeGreaterThan(0);
    // The whole-plot factor's standard error carries the whole-plot variance.
    expect(body.coefficients.find((c) => c.term === 'surface')!.stdError).toBeGreaterThan(body.coefficients.find((c) => c.term === 'payload')!.stdError);
  });

  it('answers 400 naming wholePlot for a column that is not there, malformed, or leaves no error', async () => {
    let res = await post({ data, response: 'eff', terms: ['surface', 'payload'], wholePlot: 'rig' });
    expect(res.status).toBe(400);
    let error = await errorOf(res);
    expect(error.field).toBe('wholePlot');
    expect(error.message).toMatch(/rig/);
    res = await post({ data, response: 'eff', terms: ['surface'], wholePlot: 'bed name' });
    expect(res.status).toBe(400);
    expect((await errorOf(res)).field).toBe('wholePlot');
    // Every run its own whole plot: no subplot error.
    res = await post({ data: data.map((d, i) => ({ ...d, bed: `R${i}` })), response: 'eff', terms: ['surface', 'payload'], wholePlot: 'bed' });
    expect(res.status).toBe(400);
    error = await errorOf(res);
    expect(error.field).toBe('wholePlot');
    expect(error.message).toMatch(/subplot error/);
    // The whole-plot factor as the whole plot: no whole-plot error.
    res = await post({ data, response: 'eff', terms: ['surface', 'payload'], wholePlot: 'surface' });
    expect(res.status).toBe(400);
    expect((await errorOf(res)).message).toMatch(/whole-plot error/);
    res = await post({ data, response: 'eff', terms: ['surface'], wholePlot: 'eff' });
    expect((await errorOf(res)).field).toBe('wholePlot');
    res = await post({ data: data.map((d) => ({ ...d, eff: d.eff > 0.3 ? 1 : 0 })), response: 'eff', terms: ['surface'], wholePlot: 'bed', family: 'binomial' });
    expect(res.status).toBe(400);
    expect((await errorOf(res)).field).toBe('wholePlot');
  });

  it('names the row when a run has no whole plot', async () => {
    const res = await post({ data: data.map((d, i) => (i === 5 ? { ...d, bed: null } : d)), response: 'eff', terms: ['surface', 'payload'], wholePlot: 'bed' });
    expect(res.status).toBe(400);
    expect((await errorOf(res)).field).toBe('data[5].bed');
  });
});
