import { beforeAll, describe, expect, it } from 'vitest';
import { handleSuggestionRequest } from '@/server/api/suggestions';
import { POST as routePOST } from '@/app/api/v1/suggestions/route';
import { signed, unitDatabase } from '../../support/auth';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

// Invented scenario: take-off speed (m/s) against spring preload and payload.
const body = {
  factors: [
    { name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' },
    { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  ],
  data: [
    { preload: 1, payload: 0, speed: 0.9 },
    { preload: 5, payload: 0, speed: 1.6 },
    { preload: 1, payload: 2, speed: 0.5 },
    { preload: 5, payload: 2, speed: 1.1 },
    { preload: 3, payload: 1, speed: 1.25 },
    { preload: 3, payload: 1, speed: 1.2 },
    { preload: 4, payload: 0.5, speed: 1.45, failed: false },
    { preload: 5, payload: 1.8, failed: true },
  ],
  response: 'speed',
  goal: 'maximize',
  count: 3,
  seed: 4,
};

describe('POST /api/v1/suggestions', () => {
  it('answers suggestions and the model summary', async () => {
    const res = await POST(new Request('http://x/api/v1/suggestions', { method: 'POST', body: JSON.stringify(body) }));
    expect(res.status).toBe(200);
    const json = (await res.json()) as ReturnType<typeof handleSuggestionRequest>;
    expect(json.suggestions).toHaveLength(3);
    expect(Object.keys(json.suggestions[0]!)).toEqual(expect.arrayContaining(['values', 'mean', 'sd', 'acquisition', 'reason']));
    expect(Object.keys(json.model.lengthScales)).toEqual(['preload', 'payload']);
    expect(typeof json.model.logMarginalLikelihood).toBe('number');
    expect(json.model.observations).toBe(7);
  });

  it('maps invalid input to a 400 naming the field', async () => {
    const res = await POST(new Request('http://x/api/v1/suggestions', { method: 'POST', body: JSON.stringify({ ...body, goal: 'target' }) }));
    expect(res.status).toBe(400);
    const json = (await res.json()) as { error: { field: string; code: string } };
    expect(json.error.field).toBe('goal');
    expect(() => handleSuggestionRequest({ ...body, count: 2.5 })).toThrow(/whole number/);
    expect(() => handleSuggestionRequest({ ...body, factors: [{ name: 'x', kind: 'ordinal' }] })).toThrow();
  });

  it('answers 422 when the constraints leave no feasible point', async () => {
    const res = await POST(new Request('http://x/api/v1/suggestions', {
      method: 'POST',
      body: JSON.stringify({ ...body, constraints: [{ terms: { preload: 1 }, max: 0 }] }),
    }));
    expect(res.status).toBe(422);
  });
});

describe('POST /api/v1/suggestions: optional fields', () => {
  it('accepts a strategy, change costs, minutes per trial and several responses', () => {
    const data = body.data.filter((r) => !r.failed).map((r) => ({ ...r, tilt: 2 + (r.payload as number) }));
    const out = handleSuggestionRequest({
      ...body, data, strategy: 'explore', count: 2, trialMinutes: 6, swapCost: { preload: 0 },
      responses: [{ name: 'speed', goal: 'maximize', lower: 0.5, upper: 1.8 }, { name: 'tilt', goal: 'minimize', lower: 2, upper: 5 }],
    });
    expect(out.suggestions).toHaveLength(2);
    expect(out.model.desirabilityOf).toEqual(['speed', 'tilt']);
    expect(() => handleSuggestionRequest({ ...body, swapCost: { preload: -1 } })).toThrow(/swapCost/);
    expect(() => handleSuggestionRequest({ ...body, feasibilityThreshold: 2 })).toThrow(/feasibilityThreshold/);
  });

  it('takes the batch method: local penalisation is used when asked, an unknown one names the field', () => {
    const out = handleSuggestionRequest({ ...body, strategy: 'improve', count: 3, batch: 'penalised', seed: 4 });
    expect(out.suggestions).toHaveLength(3);
    expect(out.model.acquisition ?? '').toMatch(/penalis/i);
    expect(() => handleSuggestionRequest({ ...body, batch: 'greedy' })).toThrow(/batch/);
  });
});
