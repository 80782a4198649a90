/**
 * Screening effects and Lenth's method against published examples:
 * - Lenth (1989) PSE / ME / SME on Montgomery's filtration-rate 2^4 and the BH&H process-development
 *   2^4 (fixture test/fixtures/lenth-pse; values computed from the formula, textbook PSE/ME/SME recalled and reproduced);
 * - NIST/SEMATECH e-Handbook 5.4.7.1 ceramic-strength 2^5 (effect sums of squares, R², root MSE);
 * - NIST/SEMATECH e-Handbook 5.4.7.2 catapult 2^(5-1) with centre runs (estimates, pure error, lack of fit);
 * - Box, Hunter & Hunter bicycle 2^(7-4) saturated fraction (NIST dataset BOXBIKE2; BH&H Table 6.5 effects).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze, lenthPseudoStandardError, screeningEffects } from '@/domain/analysis';

const fixture = (path: string) => readFileSync(new URL(`../../fixtures/${path}`, import.meta.url), 'utf8');
const lenth = JSON.parse(fixture('lenth-pse/expected.json'));

/** Rows of a 2^k full factorial in standard order, first factor fastest. */
function standardOrder(names: string[], ys: number[]) {
  return ys.map((y, i) => Object.fromEntries([...names.map((nm, j) => [nm, (i >> j) & 1 ? 1 : -1]), ['y', y]]));
}

const fourFactorTerms = (n: string[]) => {
  const out: string[] = [];
  for (let mask = 1; mask < 16; mask++) out.push(n.filter((_, j) => (mask >> j) & 1).join('*'));
  return out;
};

describe('Lenth (1989) pseudo standard error', () => {
  it('reproduces the t constants for m = 7, 15, 31 (non-integer df)', () => {
    for (const [m, c] of Object.entries(lenth.t_constants) as [string, { t_ME: number; t_SME: number }][]) {
      const res = lenthPseudoStandardError(Array.from({ length: Number(m) }, (_, i) => i + 1));
      expect(res.me / res.pse).toBeCloseTo(c.t_ME, 10);
      expect(res.sme / res.pse).toBeCloseTo(c.t_SME, 10);
    }
  });

  for (const key of ['montgomery_filtration_rate', 'bhh_process_development']) {
    it(`${key}: effects, PSE, ME and SME from the 2^4 data`, () => {
      const set = lenth[key];
      const ys: number[] = set.data_standard_order_ABCD ?? set.data_reconstructed_standard_order_CTPc;
      const names = key === 'montgomery_filtration_rate' ? ['A', 'B', 'C', 'D'] : ['C', 'T', 'P', 'c'];
      const data = standardOrder(names, ys);
      const screen = screeningEffects({ data, response: 'y', terms: fourFactorTerms(names) });
      const published: Record<string, number> = set.effects ?? set.effects_published;
      for (const e of screen.effects) {
        const key2 = e.term.split('*').join('');
        expect(e.effect, e.term).toBeCloseTo(published[key2]!, 10);
      }
      expect(screen.lenth!.pse).toBeCloseTo(set.lenth.PSE, 12);
      expect(screen.lenth!.s0).toBeCloseTo(set.lenth.s0, 12);
      expect(screen.lenth!.me).toBeCloseTo(set.lenth.ME, 10);
      expect(screen.lenth!.sme).toBeCloseTo(set.lenth.SME, 10);
      expect(screen.halfNormal).toHaveLength(15);
      expect(screen.halfNormal.at(-1)!.absEffect).toBe(Math.max(...screen.effects.map((x) => Math.abs(x.effect))));
    });
  }

  it('flags Montgomery’s active effects A, C, D, AC, AD against ME (textbook conclusion, recalled)', () => {
    const set = lenth.montgomery_filtration_rate;
    const screen = screeningEffects({ data: standardOrder(['A', 'B', 'C', 'D'], set.data_standard_order_ABCD), response: 'y', terms: fourFactorTerms(['A', 'B', 'C', 'D']) });
    expect(screen.effects.filter((e) => e.active).map((e) => e.term).sort()).toEqual(['A', 'A*C', 'A*D', 'C', 'D']);
    expect(screen.effects.filter((e) => e.activeSimultaneous).map((e) => e.term).sort()).toEqual(['A', 'A*C', 'A*D', 'D']);
  });
});

describe('NIST e-Handbook 5.4.7.1 ceramic strength 2^5', () => {
  const lines = fixture('nist-ehb-ceramic-2x5/CERAMIC.DAT').split(/\r?\n/);
  const start = lines.findIndex((l) => /^-{10,}/.test(l)) + 1;
  const data = lines.slice(start).map((l) => l.trim()).filter(Boolean).map((l) => {
    const [x1, x2, x3, x4, x5, y] = l.split(/\s+/).map(Number);
    return { X1: x1!, X2: x2!, X3: x3!, X4: x4!, X5: x5!, Y: y! };
  });
  const expected = JSON.parse(fixture('nist-ehb-ceramic-2x5/expected.json'));
  const names = ['X1', 'X2', 'X3', 'X4', 'X5'];
  const terms: string[] = [];
  for (let mask = 1; mask < 32; mask++) {
    const chosen = names.filter((_, j) => (mask >> j) & 1);
    if (chosen.length <= 3) terms.push(chosen.join('*'));
  }

  it('gives the printed effect sums of squares, R², adjusted R² and root MSE of the 26-term model', () => {
    expect(data).toHaveLength(32);
    const r = analyze({ data, response: 'Y', terms });
    expect(r.residualDf).toBe(6);
    for (const [term, ss] of Object.entries(expected.effect_sums_of_squares) as [string, number][]) {
      const row = r.anova.find((a) => a.source === term)!;
      expect(row.ss.toFixed(2), term).toBe(ss.toFixed(2));
    }
    expect(r.rSquared.toFixed(6)).toBe(expected.model_26_terms.r2.toFixed(6));
    expect(r.adjustedRSquared.toFixed(6)).toBe(expected.model_26_terms.adj_r2.toFixed(6));
    expect(r.residualStdError!.toFixed(5)).toBe(expected.model_26_terms.root_mse.toFixed(5));
    const screen = screeningEffects({ data, response: 'Y', terms });
    for (const [term, effect] of Object.entries(expected.effects_computed) as [string, number][]) {
      expect(screen.effects.find((e) => e.term === term)!.effect.toFixed(4), term).toBe(effect.toFixed(4));
    }
  });
});

describe('NIST e-Handbook 5.4.7.2 catapult 2^(5-1) with centre runs', () => {
  const lines = fixture('nist-ehb-catapult-2x5-1/CATAPULT.DAT').split(/\r?\n/);
  const start = lines.findIndex((l) => /^-{10,}/.test(l)) + 1;
  const data = lines.slice(start).map((l) => l.trim()).filter(Boolean).map((l) => {
    const c = l.split(/\s+/).map(Number);
    return { distance: c[0]!, h: c[6]!, s: c[7]!, b: c[8]!, l: c[9]!, e: c[10]! };
  });
  const expected = JSON.parse(fixture('nist-ehb-catapult-2x5-1/expected.json'));

  it('fits the full two-factor-interaction model as printed', () => {
    const full = expected.full_2FI_model_distance;
    const r = analyze({ data, response: 'distance', terms: full.terms.slice(1) });
    r.coefficients.forEach((c, j) => expect(c.estimate.toFixed(4), c.term).toBe(full.estimate[j].toFixed(4)));
    expect(r.coefficients[0]!.stdError!.toFixed(4)).toBe(full.std_error_b_and_intercept.toFixed(4));
    expect(r.coefficients[1]!.stdError!.toFixed(4)).toBe(full.std_error_others.toFixed(4));
    expect(r.residualDf).toBe(full.residual_df);
    const model = r.anova[0]!;
    expect(model.f!.toFixed(3)).toBe(full.F.toFixed(3));
    expect(model.p!.toFixed(5)).toBe(full.p.toFixed(5));
    expect(r.adjustedRSquared.toFixed(4)).toBe(full.adj_r2.toFixed(4));
  });

  it('forms pure error from identical settings (2 df) and tests lack of fit of the reduced model', () => {
    const red = expected.reduced_model_distance;
    const r = analyze({ data, response: 'distance', terms: red.terms.slice(1) });
    r.coefficients.forEach((c, j) => {
      // Printed to 3 decimals (57.5375 appears as 57.537): agree within half a unit of the last place.
      expect(Math.abs(c.estimate - red.estimate[j])).toBeLessThanOrEqual(0.0005 + 1e-12);
      expect(Math.abs(c.stdError! - red.std_error[j])).toBeLessThanOrEqual(0.0005 + 1e-12);
    });
    const a = red.anova;
    const row = (s: string) => r.anova.find((x) => x.source === s)!;
    expect(row('Model').ss.toFixed(2)).toBe(a.model_SS.toFixed(2));
    expect(row('Residual').ss.toFixed(2)).toBe(a.error_SS.toFixed(2));
    expect(row('Lack of fit').ss.toFixed(2)).toBe(a.lack_of_fit_SS.toFixed(2));
    expect(row('Lack of fit').df).toBe(a.lack_of_fit_df);
    expect(row('Pure error').ss.toFixed(2)).toBe(a.pure_error_SS.toFixed(2));
    expect(row('Pure error').df).toBe(a.pure_error_df);
    expect(r.lackOfFit!.f.toFixed(2)).toBe(a.lof_F.toFixed(2));
    expect(r.lackOfFit!.p.toFixed(4)).toBe(a.lof_p.toFixed(4));
    expect(Math.abs(row('Model').f! - a.F)).toBeLessThan(0.01); // printed 22.77 for 22.776 (truncated)
  });
});

describe('Box, Hunter & Hunter bicycle 2^(7-4) (NIST BOXBIKE2)', () => {
  const lines = fixture('bhh-bike-2x7-4/BOXBIKE2.DAT').split(/\r?\n/);
  const start = lines.findIndex((l) => /^-{10,}/.test(l)) + 1;
  const data = lines.slice(start).map((l) => l.trim()).filter(Boolean).map((l) => {
    const c = l.split(/\s+/).map(Number);
    return Object.fromEntries([['y', c[0]!], ...[1, 2, 3, 4, 5, 6, 7].map((j) => [`X${j}`, c[j]!])]);
  });
  const names = ['X1', 'X2', 'X3', 'X4', 'X5', 'X6', 'X7'];

  it('estimates the seven effects of the saturated fraction with their two-factor aliases', () => {
    const screen = screeningEffects({ data, response: 'y', terms: names }, { aliasOrder: 2 });
    const pub = lenth.bhh_bike;
    expect(screen.effects.map((e) => e.effect)).toEqual(Object.values(pub.effects_computed_from_BOXBIKE2).map((v) => expect.closeTo(v as number, 10)));
    expect(screen.lenth!.pse).toBeCloseTo(pub.lenth.PSE, 12);
    expect(screen.lenth!.me).toBeCloseTo(pub.lenth.ME, 10);
    expect(screen.lenth!.sme).toBeCloseTo(pub.lenth.SME, 10);
    // Resolution III: each main effect is aliased with three two-factor interactions.
    for (const e of screen.effects) expect(e.aliases, e.term).toHaveLength(3);
    expect(screen.analysis.residualDf).toBe(0);
  });
});
