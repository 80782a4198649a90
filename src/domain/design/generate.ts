/** generateDesign: one entry point from a design request to randomised runs with diagnostics. */
import { DomainError, invalidInput } from '../errors';
import {
  codePoint,
  decodePoint,
  isFeasible,
  standardTerms,
  validateSpace,
  type Factor,
  type FactorSpace,
  type StandardModel,
} from '../factors';
import { seededRandom } from '../random';
import { centralCompositeDesign } from './central-composite';
import { designDiagnostics } from './diagnostics';
import { fullFactorialDesign } from './full-factorial';
import { randomiseRunOrder } from './randomise';
import { DESIGN_METHODS, type CodedRun, type DesignResult, type DesignRun, type DesignSpec } from './types';

const MODELS: readonly StandardModel[] = ['main-effects', 'interactions', 'quadratic'];

/** Model a method supports when the request names none. */
export function defaultModel(method: DesignSpec['method']): StandardModel {
  switch (method) {
    case 'central-composite':
    case 'box-behnken':
    case 'definitive-screening':
      return 'quadratic';
    case 'full-factorial':
      return 'interactions';
    default:
      return 'main-effects';
  }
}

export const DEFAULT_SEED = 1;

function checkSpec(spec: DesignSpec): void {
  if (!spec || typeof spec !== 'object') throw invalidInput('(body)', 'send a design request object');
  if (!DESIGN_METHODS.includes(spec.method)) throw invalidInput('method', `method must be one of: ${DESIGN_METHODS.join(', ')}`);
  if (spec.model !== undefined && !MODELS.includes(spec.model)) throw invalidInput('model', `model must be one of: ${MODELS.join(', ')}`);
  if (spec.seed !== undefined && !Number.isInteger(spec.seed)) throw invalidInput('seed', 'seed must be a whole number');
  validateSpace({ factors: spec.factors, constraints: spec.constraints, disallowed: spec.disallowed });
}

function space(spec: DesignSpec): FactorSpace {
  return { factors: spec.factors, constraints: spec.constraints, disallowed: spec.disallowed };
}

function construct(spec: DesignSpec, model: StandardModel, notes: string[]): CodedRun[] {
  const { factors } = spec;
  switch (spec.method) {
    case 'full-factorial':
      return fullFactorialDesign(factors, { model, replicates: spec.replicates, centerPoints: spec.centerPoints });
    case 'central-composite': {
      const d = centralCompositeDesign(factors, { alpha: spec.alpha, centerPoints: spec.centerPoints, replicates: spec.replicates });
      if (d.alpha > 1 + 1e-12) {
        notes.push(`axial runs sit at ±${d.alpha.toFixed(4)} in coded units, beyond the factor ranges; check the rig can reach them`);
      } else if (d.alpha < 1 - 1e-12) {
        notes.push(`axial runs sit at ±${d.alpha.toFixed(4)} in coded units, inside the factor ranges`);
      }
      return d.runs;
    }
    default:
      throw new DomainError('unsupported', `method "${spec.method}" is not available yet`, 'method');
  }
}

/** Fail when a classical construction puts runs outside the constraints; name how many and which. */
function assertFeasible(spec: DesignSpec, runs: readonly CodedRun[]): void {
  const sp = space(spec);
  if (!sp.constraints?.length && !sp.disallowed?.length) return;
  const bad = runs.map((r, i) => ({ i, ok: isFeasible(sp, decodePoint(spec.factors, r.coded)) })).filter((r) => !r.ok);
  if (bad.length > 0) {
    throw new DomainError(
      'infeasible',
      `${bad.length} of ${runs.length} runs of this ${spec.method} design break the constraints or disallowed combinations; use method "optimal", which honours them`,
      'constraints',
      { runs: bad.slice(0, 20).map((b) => b.i + 1) },
    );
  }
}

/** Natural values of a coded run (continuous factors are not snapped, so axial points keep α). */
function naturalValues(factors: readonly Factor[], coded: readonly number[]) {
  return decodePoint(factors, coded);
}

export function generateDesign(spec: DesignSpec): DesignResult {
  checkSpec(spec);
  const model = spec.model ?? defaultModel(spec.method);
  const seed = spec.seed ?? DEFAULT_SEED;
  const notes: string[] = [];
  const existing: DesignRun[] = (spec.existingRuns ?? []).map((pt, i) => {
    let coded: number[];
    try {
      coded = codePoint(spec.factors, pt);
    } catch (e) {
      if (e instanceof DomainError) throw invalidInput(`existingRuns[${i}].${e.field ?? ''}`, e.message);
      throw e;
    }
    return { order: 0, values: naturalValues(spec.factors, coded), coded, existing: true };
  });
  const fresh = construct(spec, model, notes);
  assertFeasible(spec, fresh);
  const ordered = randomiseRunOrder(fresh, seededRandom(seed));
  const runs: DesignRun[] = [
    ...existing,
    ...ordered.map((r) => {
      const run: DesignRun = { order: 0, values: naturalValues(spec.factors, r.coded), coded: r.coded.slice() };
      if (r.block !== undefined) run.block = r.block;
      if (r.wholePlot !== undefined) run.wholePlot = r.wholePlot;
      return run;
    }),
  ];
  runs.forEach((r, i) => (r.order = i + 1));
  const terms = standardTerms(spec.factors, model);
  const diagnostics = designDiagnostics(spec.factors, terms, runs.map((r) => r.coded), notes);
  return { runs, diagnostics, method: spec.method, model, terms: terms.map((t) => t.label), seed };
}
