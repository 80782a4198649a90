/**
 * Screening: effect estimates of two-level designs (effect = 2 × coefficient for factors coded
 * −1/+1), Lenth's pseudo standard error with margin of error (ME) and simultaneous margin (SME),
 * half-normal plot data, and alias-aware labels for regular fractions.
 */
// Lenth (1989), Technometrics 31:469-473
import { invalidInput } from '../errors';
import { compileModel, numericRange, parseTerm, INTERCEPT, type ModelTerm } from '../factors';
import { normalQuantile, tQuantile } from './distributions';
import { buildModelFrame } from './model-frame';
import { analyze } from './analyze';
import type { AnalysisRequest, AnalysisResult } from './types';

export interface LenthResult {
  /** Number of contrasts. */
  m: number;
  /** Initial scale 1.5 · median |c|. */
  s0: number;
  /** Pseudo standard error 1.5 · median of |c| below 2.5 s0. */
  pse: number;
  /** Degrees of freedom m/3 of the reference t distribution. */
  df: number;
  /** Margin of error t(1 − α/2; d) · PSE and simultaneous margin t(γ; d) · PSE, γ = (1 + (1 − α)^(1/m))/2. */
  me: number;
  sme: number;
  alpha: number;
}

function median(xs: readonly number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k]! : (s[k - 1]! + s[k]!) / 2;
}

/** Lenth's pseudo standard error, ME and SME for a set of contrasts (or effects). */
export function lenthPseudoStandardError(contrasts: readonly number[], alpha = 0.05): LenthResult {
  const m = contrasts.length;
  if (m < 2) throw invalidInput('effects', 'Lenth’s method needs at least two effects');
  if (!(alpha > 0 && alpha < 1)) throw invalidInput('alpha', 'alpha must lie between 0 and 1');
  const abs = contrasts.map(Math.abs);
  const s0 = 1.5 * median(abs);
  const kept = abs.filter((a) => a < 2.5 * s0);
  const pse = kept.length > 0 ? 1.5 * median(kept) : 0;
  const df = m / 3;
  const gamma = (1 + Math.pow(1 - alpha, 1 / m)) / 2;
  return { m, s0, pse, df, me: tQuantile(1 - alpha / 2, df) * pse, sme: tQuantile(gamma, df) * pse, alpha };
}

export interface EffectEstimate {
  /** Model-matrix column, e.g. "X1" or "X1*X2". */
  term: string;
  /** The column with the terms fully aliased with it, e.g. "X1 + X2*X4". */
  label: string;
  /** Aliased terms and the sign of each alias (+1 / −1). */
  aliases: { term: string; sign: number }[];
  effect: number;
  coefficient: number;
  /** |effect| > ME and > SME by Lenth's method (when it applies). */
  active: boolean;
  activeSimultaneous: boolean;
}

export interface HalfNormalPoint {
  label: string;
  absEffect: number;
  /** Half-normal quantile Φ⁻¹(0.5 + 0.5 (i − 0.5)/m) of the i-th smallest |effect| (common practice, no source). */
  quantile: number;
}

export interface ScreeningResult {
  analysis: AnalysisResult;
  effects: EffectEstimate[];
  lenth: LenthResult | null;
  halfNormal: HalfNormalPoint[];
}

/** Half-normal plot data: |effects| ascending against half-normal quantiles. */
export function halfNormalPlotData(effects: readonly { label: string; effect: number }[]): HalfNormalPoint[] {
  const m = effects.length;
  return effects
    .map((e) => ({ label: e.label, absEffect: Math.abs(e.effect) }))
    .sort((a, b) => a.absEffect - b.absEffect)
    .map((e, i) => ({ ...e, quantile: normalQuantile(0.5 + (0.5 * (i + 0.5)) / m) }));
}

/** All products of up to `order` distinct numeric factors among those named. */
function candidateInteractions(names: readonly string[], order: number): ModelTerm[] {
  const out: ModelTerm[] = [];
  const rec = (start: number, chosen: string[]) => {
    if (chosen.length >= 2) out.push(parseTerm(chosen.join('*')));
    if (chosen.length === order) return;
    for (let i = start; i < names.length; i++) rec(i + 1, [...chosen, names[i]!]);
  };
  rec(0, []);
  return out;
}

/**
 * Effects of a two-level screening analysis with Lenth's method and alias-aware labels. Effects
 * are 2 × coefficient in coded units (a natural-unit analysis is converted with each factor's half
 * range); terms with powers are skipped. Interactions up to `aliasOrder` factors that are not in the
 * model but equal (±) a model column on these runs are listed as its aliases.
 */
export function screeningEffects(request: AnalysisRequest, options: { alpha?: number; aliasOrder?: number } = {}): ScreeningResult {
  const analysis = analyze({ ...request, diagnostics: request.diagnostics ?? false });
  const factorOf = new Map(analysis.factors.map((f) => [f.name, f]));
  const frame = buildModelFrame(request);
  const n = frame.n;
  // Alias detection on the runs: candidate interaction columns equal to ± a model column.
  const numericNames = analysis.factors.filter((f) => f.kind !== 'categorical').map((f) => f.name);
  const inModel = new Set(analysis.terms);
  const candidates = candidateInteractions(numericNames, options.aliasOrder ?? 3).filter((t) => !inModel.has(t.label));
  const candModel = compileModel(analysis.factors, [INTERCEPT, ...candidates]);
  const modelCols = new Map(frame.model.labels.map((l, j) => [l, j]));
  const aliasesOf = new Map<string, { term: string; sign: number }[]>();
  if (candidates.length > 0 && candidates.length <= 2000) {
    const candRows = frame.points.map((pt) => candModel.row(pt));
    for (const c of analysis.coefficients) {
      const j = modelCols.get(c.term)!;
      const col = Array.from({ length: n }, (_, i) => frame.x[j * n + i]!);
      const norm = Math.hypot(...col);
      const found: { term: string; sign: number }[] = [];
      for (let k = 1; k < candModel.p; k++) {
        let dot = 0;
        let nn = 0;
        for (let i = 0; i < n; i++) {
          const v = candRows[i]![k]!;
          dot += v * col[i]!;
          nn += v * v;
        }
        const cn = Math.sqrt(nn);
        if (cn > 0 && norm > 0 && Math.abs(Math.abs(dot) - cn * norm) <= 1e-9 * cn * norm) found.push({ term: candModel.labels[k]!, sign: Math.sign(dot) });
      }
      aliasesOf.set(c.term, found);
    }
    // Aliased model columns (not estimable) are aliases of the estimable column they equal.
    for (const a of analysis.aliased) {
      const ja = modelCols.get(a)!;
      for (const c of analysis.coefficients) {
        const j = modelCols.get(c.term)!;
        let dot = 0;
        let na = 0;
        let nb = 0;
        for (let i = 0; i < n; i++) {
          dot += frame.x[ja * n + i]! * frame.x[j * n + i]!;
          na += frame.x[ja * n + i]! ** 2;
          nb += frame.x[j * n + i]! ** 2;
        }
        if (Math.abs(Math.abs(dot) - Math.sqrt(na * nb)) <= 1e-9 * Math.sqrt(na * nb)) aliasesOf.get(c.term)?.unshift({ term: a, sign: Math.sign(dot) });
      }
    }
  }
  const effects: EffectEstimate[] = [];
  for (const c of analysis.coefficients) {
    if (c.term === INTERCEPT.label) continue;
    const term = parseTerm(c.modelTerm);
    if (term.parts.some((p) => p.power > 1)) continue;
    let scale = 2;
    if (analysis.coding === 'natural') {
      for (const p of term.parts) {
        const f = factorOf.get(p.name)!;
        if (f.kind !== 'categorical') {
          const { low, high } = numericRange(f);
          scale *= (high - low) / 2;
        }
      }
    }
    const aliases = aliasesOf.get(c.term) ?? [];
    const label = [c.term, ...aliases.map((a) => `${a.sign < 0 ? '−' : '+'} ${a.term}`)].join(' ');
    effects.push({ term: c.term, label, aliases, effect: scale * c.estimate, coefficient: c.estimate, active: false, activeSimultaneous: false });
  }
  const lenth = effects.length >= 2 ? lenthPseudoStandardError(effects.map((e) => e.effect), options.alpha ?? 0.05) : null;
  if (lenth && lenth.pse > 0) {
    for (const e of effects) {
      e.active = Math.abs(e.effect) > lenth.me;
      e.activeSimultaneous = Math.abs(e.effect) > lenth.sme;
    }
  }
  return { analysis, effects, lenth, halfNormal: halfNormalPlotData(effects) };
}
