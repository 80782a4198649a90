/** generateDesign: one entry point from a design request to randomised runs with diagnostics. */
import { DomainError, invalidInput } from '../errors';
import {
  codePoint,
  compileModel,
  decodePoint,
  modelMatrix,
  type ModelTerm,
  isFeasible,
  standardTerms,
  validateSpace,
  type Factor,
  type FactorSpace,
  type Point,
  type StandardModel,
} from '../factors';
import { seededRandom } from '../random';
import { boxBehnkenDesign } from './box-behnken';
import { definitiveScreeningDesign } from './definitive-screening';
import { maximinLatinHypercube } from './latin-hypercube';
import { codedRegion } from './region';
import { sobolPoints } from './sobol';
import { centralCompositeDesign } from './central-composite';
import { designDiagnostics } from './diagnostics';
import { fullFactorialDesign } from './full-factorial';
import { randomiseRunOrder } from './randomise';
import {
  aliasList,
  assertTwoLevel,
  chooseFraction,
  FACTOR_LETTERS,
  fractionRuns,
  fractionStructure,
  parseGenerators,
  twoLevelCoded,
  wordLetters,
  type Generator,
} from './fractional-factorial';
import { centreRuns } from './full-factorial';
import { blockFullFactorial, blockTwoLevel, type FactorialBlocking } from './blocking';
import { codedLevels } from './levels';
import { plackettBurmanDesign } from './plackett-burman';
import { blockFactor, optimalDesign, type OptimalDesignOptions } from './optimal-design';
import {
  DESIGN_METHODS,
  type CodedRun,
  type DesignDiagnostics,
  type DesignResult,
  type DesignRun,
  type DesignSpec,
  type FractionSummary,
  type BlockingSummary,
} from './types';

const MODELS: readonly StandardModel[] = ['main-effects', 'interactions', 'quadratic'];

/** Model a method supports when the request names none. */
export function defaultModel(method: DesignSpec['method']): StandardModel {
  switch (method) {
    case 'central-composite':
    case 'box-behnken':
      return 'quadratic';
    case 'full-factorial':
      return 'interactions';
    default:
      return 'main-effects';
  }
}

export const DEFAULT_SEED = 1;

/** Methods whose block generators the request may name (two-level designs only). */
const GIVEN_GENERATOR_METHODS: readonly DesignSpec['method'][] = ['full-factorial', 'fractional-factorial'];

/** Block generators named by the request, or undefined when the blocks are to be searched for. */
function givenBlockGenerators(spec: DesignSpec): string[] | undefined {
  return spec.blockGenerators?.length ? spec.blockGenerators : undefined;
}

/** Methods that take `blocks`. */
const BLOCKED_METHODS: readonly DesignSpec['method'][] = ['full-factorial', 'fractional-factorial', 'central-composite', 'optimal'];

function checkSpec(spec: DesignSpec): void {
  if (!spec || typeof spec !== 'object') throw invalidInput('(body)', 'send a design request object');
  if (!DESIGN_METHODS.includes(spec.method)) throw invalidInput('method', `method must be one of: ${DESIGN_METHODS.join(', ')}`);
  if (spec.model !== undefined && !MODELS.includes(spec.model)) throw invalidInput('model', `model must be one of: ${MODELS.join(', ')}`);
  if (spec.seed !== undefined && !Number.isInteger(spec.seed)) throw invalidInput('seed', 'seed must be a whole number');
  validateSpace({ factors: spec.factors, constraints: spec.constraints, disallowed: spec.disallowed });
  if (spec.blocks !== undefined && (!Number.isInteger(spec.blocks) || spec.blocks < 1)) throw invalidInput('blocks', 'blocks must be a whole number of at least 1');
  if (spec.blocks !== undefined && spec.blocks > 1 && !BLOCKED_METHODS.includes(spec.method)) {
    throw new DomainError('unsupported', `blocks apply to ${BLOCKED_METHODS.join(', ')} designs; ${spec.method} designs here are not blocked`, 'blocks');
  }
  if (spec.blockGenerators !== undefined) {
    const given = spec.blockGenerators;
    if (!Array.isArray(given) || given.some((g) => typeof g !== 'string')) {
      throw invalidInput('blockGenerators', 'blockGenerators is a list of interaction words over the factor letters, e.g. ["ABC", "CDE"]');
    }
    if (given.length > 0 && !GIVEN_GENERATOR_METHODS.includes(spec.method)) {
      throw new DomainError(
        'unsupported',
        `block generators are given for two-level full factorials and fractional factorials; ${spec.method} designs take blocks alone (their blocks are chosen here); leave blockGenerators out`,
        'blockGenerators',
      );
    }
    const q = given.length;
    if (q > 0 && spec.blocks !== undefined && spec.blocks !== 2 ** q) {
      throw invalidInput(
        'blockGenerators',
        `${q} block generator${q > 1 ? 's' : ''} give${q > 1 ? '' : 's'} 2^${q} = ${2 ** q} blocks, but blocks is ${spec.blocks}; give as many generators as log2(blocks), or leave blocks out`,
      );
    }
  }
  if (spec.blockEffects !== undefined && spec.method !== 'optimal') {
    throw new DomainError('unsupported', 'random block effects are taken into account by the optimal method only; leave blockEffects out or set method to "optimal"', 'blockEffects');
  }
  if (spec.wholePlots !== undefined && spec.method !== 'optimal') {
    throw new DomainError('unsupported', 'whole plots (split-plot designs) are built by the optimal method; set method to "optimal"', 'wholePlots');
  }
}

function space(spec: DesignSpec): FactorSpace {
  return { factors: spec.factors, constraints: spec.constraints, disallowed: spec.disallowed };
}

/** What a construction adds to the diagnostics besides the runs. */
type Extras = Pick<DesignDiagnostics, 'fraction' | 'axialDistance' | 'optimal'> & { blocking?: FactorialBlocking };

function replicate(runs: CodedRun[], replicates: number | undefined): CodedRun[] {
  const r = replicates ?? 1;
  if (!Number.isInteger(r) || r < 1) throw invalidInput('replicates', 'replicates must be a whole number of at least 1');
  const out: CodedRun[] = [];
  for (let i = 0; i < r; i++) for (const run of runs) out.push({ ...run, coded: run.coded.slice() });
  return out;
}

/** Longest effect that must stay clear of blocks: two-factor interactions when the model has them. */
function protectedLength(model: StandardModel): number {
  return model === 'main-effects' ? 1 : 2;
}

/**
 * Blocked runs of a factorial: each replicate is split into the same blocks (blocks of later
 * replicates numbered on), and every block gets `centerPoints` centre runs.
 */
function blockedFactorialRuns(factors: readonly Factor[], rows: readonly CodedRun[], blocking: FactorialBlocking, spec: DesignSpec): CodedRun[] {
  const r = spec.replicates ?? 1;
  if (!Number.isInteger(r) || r < 1) throw invalidInput('replicates', 'replicates must be a whole number of at least 1');
  const n0 = spec.centerPoints ?? 0;
  if (!Number.isInteger(n0) || n0 < 0) throw invalidInput('centerPoints', 'centerPoints must be a whole number of at least 0');
  const out: CodedRun[] = [];
  for (let rep = 0; rep < r; rep++) {
    for (const row of rows) out.push({ coded: row.coded.slice(), block: rep * blocking.blocks + row.block! });
    for (let b = 1; b <= blocking.blocks; b++) out.push(...centreRuns(factors, n0).map((c) => ({ ...c, block: rep * blocking.blocks + b })));
  }
  return out;
}

function withCentres(factors: readonly Factor[], runs: CodedRun[], centerPoints: number | undefined): CodedRun[] {
  const n0 = centerPoints ?? 0;
  if (!Number.isInteger(n0) || n0 < 0) throw invalidInput('centerPoints', 'centerPoints must be a whole number of at least 0');
  return [...runs, ...centreRuns(factors, n0)];
}

/** Describe a two-level fraction for the diagnostics. */
export function summariseFraction(factors: readonly Factor[], generators: readonly Generator[]): FractionSummary {
  const k = factors.length;
  const st = fractionStructure(k, generators);
  const wlp: Record<string, number> = {};
  st.wordLengthPattern.forEach((c, len) => {
    if (c > 0) wlp[String(len)] = c;
  });
  const letters: Record<string, string> = {};
  factors.forEach((f, i) => (letters[FACTOR_LETTERS[i]!] = f.name));
  return {
    generators: generators.map((g) => `${FACTOR_LETTERS[g.target]}=${g.sign < 0 ? '-' : ''}${wordLetters(g.mask)}`),
    letters,
    definingRelation: st.words.map((w) => (w.sign < 0 ? '-' : '') + wordLetters(w.mask)),
    resolution: Number.isFinite(st.resolution) ? st.resolution : k + 1,
    wordLengthPattern: wlp,
    aliases: aliasList(k, st.words, factors.map((f) => f.name)),
  };
}

function fractionalFactorial(spec: DesignSpec, model: StandardModel, extras: Extras): CodedRun[] {
  const { factors } = spec;
  assertTwoLevel(factors, 'fractional factorial');
  const k = factors.length;
  if (spec.resolution !== undefined && (!Number.isInteger(spec.resolution) || spec.resolution < 3)) {
    throw invalidInput('resolution', 'resolution must be a whole number of at least 3 (III)');
  }
  let generators: Generator[];
  if (spec.generators?.length) {
    generators = parseGenerators(spec.generators, factors.map((f) => f.name));
    if (spec.resolution !== undefined) {
      const r = fractionStructure(k, generators).resolution;
      if (r < spec.resolution) throw invalidInput('generators', `these generators give resolution ${r}, below the ${spec.resolution} asked for`);
    }
  } else if (spec.resolution === undefined && spec.runs !== undefined) {
    // The highest resolution the run count allows.
    let found: Generator[] | null = null;
    for (let r = k; r >= 3 && !found; r--) {
      try {
        found = chooseFraction(k, r, spec.runs);
      } catch (e) {
        if (!(e instanceof DomainError) || e.field !== 'resolution') throw e;
      }
    }
    if (!found) throw new DomainError('unsupported', `${spec.runs} runs give no fraction of resolution III or more for ${k} factors`, 'runs');
    generators = found;
  } else {
    const resolution = spec.resolution ?? (model === 'main-effects' ? 4 : 5);
    generators = chooseFraction(k, resolution, spec.runs);
  }
  extras.fraction = summariseFraction(factors, generators);
  const pm = fractionRuns(k, generators);
  const toCoded = (row: number[]) => row.map((v, j) => twoLevelCoded(factors[j]!, v));
  if ((spec.blocks ?? 1) > 1) {
    const blocking = blockTwoLevel(k, generators, spec.blocks!, protectedLength(model), factors.map((f) => f.name), undefined, givenBlockGenerators(spec));
    extras.blocking = blocking;
    return blockedFactorialRuns(factors, pm.map((row) => ({ coded: toCoded(row), block: blocking.blockOf(row) })), blocking, spec);
  }
  return withCentres(factors, replicate(pm.map((row) => ({ coded: toCoded(row) })), spec.replicates), spec.centerPoints);
}

function construct(
  spec: DesignSpec,
  model: StandardModel,
  notes: string[],
  extras: Extras,
  existingCoded: number[][],
  options: OptimalDesignOptions,
): CodedRun[] {
  const { factors } = spec;
  switch (spec.method) {
    case 'optimal': {
      if (spec.starts !== undefined && (!Number.isInteger(spec.starts) || spec.starts < 1 || spec.starts > 10_000)) {
        throw invalidInput('starts', 'starts must be a whole number from 1 to 10000');
      }
      const out = optimalDesign(spec, model, existingCoded, { ...options, starts: spec.starts ?? options.starts, varianceRatio: spec.varianceRatio ?? options.varianceRatio });
      extras.optimal = {
        criterion: out.search.criterion,
        value: out.search.value,
        startsCompleted: out.search.startsCompleted,
        stopped: out.search.stopped,
      };
      if (spec.wholePlots !== undefined) {
        extras.optimal.wholePlots = spec.wholePlots;
        extras.optimal.varianceRatio = out.varianceRatio;
      } else if (spec.blockEffects === 'random' && (spec.blocks ?? 1) > 1) {
        extras.optimal.randomBlocks = spec.blocks;
        extras.optimal.varianceRatio = out.varianceRatio;
        notes.push('blocks were treated as random in the search; the efficiencies and power below treat them as fixed');
      }
      if (spec.factors.some((f) => f.hardToChange) && spec.wholePlots === undefined) {
        notes.push('hard-to-change factors were randomised freely; give wholePlots for a split-plot design');
      }
      return out.runs;
    }
    case 'full-factorial': {
      if ((spec.blocks ?? 1) === 1) return fullFactorialDesign(factors, { model, replicates: spec.replicates, centerPoints: spec.centerPoints });
      const rows = fullFactorialDesign(factors, { model });
      const levelLists = factors.map((f) => codedLevels(f, model === 'quadratic' ? [-1, 0, 1] : [-1, 1]));
      const given = givenBlockGenerators(spec);
      if (given) {
        // Named block generators: a two-level full factorial, each factor's low level −1 and high +1.
        levelLists.forEach((l, j) => {
          if (l.length !== 2) {
            throw new DomainError(
              'unsupported',
              `block generators are words of a two-level design, but ${factors[j]!.name} has ${l.length} levels here${model === 'quadratic' ? ' (the quadratic model puts numeric factors at three)' : ''}; leave blockGenerators out to have the blocks chosen, or use two-level factors and the main-effects or interactions model`,
              'blockGenerators',
            );
          }
        });
        const blocking = blockTwoLevel(factors.length, [], spec.blocks!, protectedLength(model), factors.map((f) => f.name), undefined, given);
        extras.blocking = blocking;
        const signs = (coded: readonly number[]) => coded.map((c, j) => (c === levelLists[j]![0] ? -1 : 1));
        return blockedFactorialRuns(factors, rows.map((r) => ({ coded: r.coded, block: blocking.blockOf(signs(r.coded)) })), blocking, spec);
      }
      const blocking = blockFullFactorial(levelLists, spec.blocks!, protectedLength(model), factors.map((f) => f.name));
      extras.blocking = blocking;
      return blockedFactorialRuns(factors, rows.map((r) => ({ coded: r.coded, block: blocking.blockOf(r.coded) })), blocking, spec);
    }
    case 'fractional-factorial':
      return fractionalFactorial(spec, model, extras);
    case 'plackett-burman': {
      assertTwoLevel(factors, 'Plackett–Burman');
      const rows = plackettBurmanDesign(factors.length, spec.runs).map((row) => ({ coded: row.map((pm, j) => twoLevelCoded(factors[j]!, pm)) }));
      return withCentres(factors, replicate(rows, spec.replicates), spec.centerPoints);
    }
    case 'central-composite': {
      const d = centralCompositeDesign(factors, {
        alpha: spec.alpha,
        centerPoints: spec.centerPoints,
        replicates: spec.replicates,
        resolution: spec.resolution,
        blocks: spec.blocks,
      });
      extras.axialDistance = d.alpha;
      if (d.blocking) extras.blocking = d.blocking;
      if (d.blockingAlpha !== undefined && Math.abs(d.alpha - d.blockingAlpha) > 1e-9) {
        notes.push(`at this α the blocks are not orthogonal to the quadratic model; α = ${d.blockingAlpha.toFixed(4)} (alpha "orthogonal") makes them so`);
      }
      if (d.alpha > 1 + 1e-12) {
        notes.push(`axial runs sit at ±${d.alpha.toFixed(4)} in coded units, beyond the factor ranges; check the rig can reach them`);
      } else if (d.alpha < 1 - 1e-12) {
        notes.push(`axial runs sit at ±${d.alpha.toFixed(4)} in coded units, inside the factor ranges`);
      }
      return d.runs;
    }
    case 'definitive-screening':
      return withCentres(factors, replicate(definitiveScreeningDesign(factors, { runs: spec.runs }), spec.replicates), spec.centerPoints);
    case 'latin-hypercube':
      return latinHypercubeRuns(spec);
    case 'sobol':
      return sobolRuns(spec);
    case 'box-behnken':
      return boxBehnkenDesign(factors, { centerPoints: spec.centerPoints, replicates: spec.replicates });
    default:
      throw new DomainError('unsupported', `method "${spec.method}" is not available yet`, 'method');
  }
}

/** Default runs of a space-filling design: 10 per factor (common practice, no source). */
function spaceFillingRuns(spec: DesignSpec): number {
  const n = spec.runs ?? 10 * spec.factors.length;
  if (!Number.isInteger(n) || n < 2) throw invalidInput('runs', 'runs must be a whole number of at least 2');
  return n;
}

/** A unit-interval coordinate u ∈ [0, 1] as the factor's coded value (discrete values snapped). */
function unitToCoded(f: Factor, u: number): number {
  if (f.kind === 'categorical') return Math.min(f.levels.length - 1, Math.floor(u * f.levels.length));
  const c = -1 + 2 * u;
  if (f.kind === 'discrete') return codePoint([f], decodePoint([f], [c]))[0]!;
  return c;
}

function latinHypercubeRuns(spec: DesignSpec): CodedRun[] {
  spec.factors.forEach((f, i) => {
    if (f.kind === 'categorical') {
      throw new DomainError('unsupported', `a Latin hypercube needs numeric factors; ${f.name} is categorical (use Sobol points or an optimal design)`, `factors[${i}].kind`);
    }
  });
  const n = spaceFillingRuns(spec);
  // A stream of its own, so the run-order shuffle does not change the design.
  const rng = seededRandom((spec.seed ?? DEFAULT_SEED) * 7919 + 17);
  return maximinLatinHypercube(n, spec.factors.length, rng).map((row) => ({
    coded: row.map((lv, j) => unitToCoded(spec.factors[j]!, lv / (n - 1))),
  }));
}

function sobolRuns(spec: DesignSpec): CodedRun[] {
  const n = spaceFillingRuns(spec);
  const region = codedRegion(space(spec));
  // The scramble has a stream of its own, so the run-order shuffle does not change the points.
  // Constrained regions keep the feasible points in sequence order until n are found.
  let batch = n;
  for (let attempt = 0; attempt < 8; attempt++) {
    const points = sobolPoints(Math.min(batch, 2 ** 20), spec.factors.length, seededRandom((spec.seed ?? DEFAULT_SEED) * 7919 + 29));
    const runs: CodedRun[] = [];
    for (const u of points) {
      const coded = u.map((v, j) => unitToCoded(spec.factors[j]!, v));
      if (region.feasible(coded)) runs.push({ coded });
      if (runs.length === n) return runs;
    }
    batch *= 4;
  }
  throw new DomainError('infeasible', 'too few Sobol points fall inside the constraints; check them against the factor ranges', 'constraints');
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

/** Block sizes, generators, confounded effects and the orthogonality of the model columns to blocks. */
function blockingSummary(factors: readonly Factor[], terms: readonly ModelTerm[], runs: readonly DesignRun[], scheme: FactorialBlocking | undefined): BlockingSummary {
  const ids = [...new Set(runs.map((r) => r.block ?? 0))].sort((a, b) => a - b);
  const model = compileModel(factors, terms);
  const { data, n, p } = modelMatrix(model, runs.map((r) => r.coded));
  let maxCorrelation = 0;
  let orthogonal = true;
  for (let j = 0; j < p; j++) {
    if (model.labels[j] === '(Intercept)') continue;
    let mean = 0;
    let ss = 0;
    for (let i = 0; i < n; i++) mean += data[i * p + j]!;
    mean /= n;
    for (let i = 0; i < n; i++) ss += (data[i * p + j]! - mean) ** 2;
    for (const b of ids) {
      // Covariance of column j with the indicator of block b: Σ over the block of (x − mean).
      let cov = 0;
      let size = 0;
      runs.forEach((r, i) => {
        if ((r.block ?? 0) !== b) return;
        cov += data[i * p + j]! - mean;
        size++;
      });
      const zss = size - (size * size) / n;
      if (Math.abs(cov) > 1e-9 * Math.max(1, Math.sqrt(ss * n))) orthogonal = false;
      if (ss > 0 && zss > 0) maxCorrelation = Math.max(maxCorrelation, Math.abs(cov) / Math.sqrt(ss * zss));
    }
  }
  const fresh = ids.filter((b) => b !== 0);
  return {
    blocks: fresh.length,
    runsPerBlock: ids.map((block) => ({ block, runs: runs.filter((r) => (r.block ?? 0) === block).length })),
    generators: scheme?.generators ?? [],
    confounded: scheme?.confounded ?? [],
    orthogonal,
    maxBlockCorrelation: maxCorrelation,
  };
}

/** Mark main effects and two-factor interactions of a fraction's alias list that are confounded with blocks. */
function markBlockAliases(fraction: FractionSummary, scheme: FactorialBlocking): FractionSummary {
  const words = new Set(scheme.confounded.flatMap((c) => [c.effect, ...c.aliases]));
  return { ...fraction, aliases: fraction.aliases.map((a) => (words.has(a.effect) ? { ...a, aliases: [...a.aliases, 'Blocks'] } : a)) };
}

/**
 * Build the design a request describes. `options` carries the search controls of optimal designs
 * (progress callback, stop check) that have no place in a JSON request.
 */
export function generateDesign(request: DesignSpec, options: OptimalDesignOptions = {}): DesignResult {
  checkSpec(request);
  // Named block generators set the number of blocks when `blocks` is left out.
  const q = givenBlockGenerators(request)?.length ?? 0;
  const spec: DesignSpec = q > 0 && request.blocks === undefined ? { ...request, blocks: 2 ** q } : request;
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
    // Runs already made keep the values as logged (not snapped to allowed values or rounded).
    const values: Point = {};
    for (const f of spec.factors) values[f.name] = f.kind === 'categorical' ? String(pt[f.name]) : Number(pt[f.name]);
    return { order: 0, values, coded, existing: true };
  });
  const extras: Extras = {};
  const fresh = construct(spec, model, notes, extras, existing.map((r) => r.coded), options);
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
  const diagnosticsOptions = { constraints: spec.constraints, disallowed: spec.disallowed, power: spec.power ?? {}, seed };
  // Blocks enter the diagnostics model as a categorical factor (existing runs in block 0).
  const blockIds = new Set(runs.map((r) => r.block ?? 0));
  let base: DesignDiagnostics;
  if (blockIds.size > 1) {
    const ids = [...blockIds].sort((a, b) => a - b);
    const block = { ...blockFactor(spec.factors, ids.length), levels: ids.map(String) };
    const allTerms = [...terms, { label: block.name, parts: [{ name: block.name, power: 1 }] }];
    base = designDiagnostics([...spec.factors, block], allTerms, runs.map((r) => [...r.coded, ids.indexOf(r.block ?? 0)]), notes, diagnosticsOptions);
  } else {
    base = designDiagnostics(spec.factors, terms, runs.map((r) => r.coded), notes, diagnosticsOptions);
  }
  const { blocking: scheme, ...rest } = extras;
  const diagnostics: DesignDiagnostics = { ...base, ...rest };
  if (blockIds.size > 1 || runs.some((r) => r.block !== undefined)) {
    diagnostics.blocking = blockingSummary(spec.factors, terms, runs, scheme);
    if (scheme && diagnostics.fraction) diagnostics.fraction = markBlockAliases(diagnostics.fraction, scheme);
  }
  const opt = diagnostics.optimal;
  if (opt && (opt.wholePlots !== undefined || opt.randomBlocks !== undefined) && opt.criterion === 'D' && Number.isFinite(opt.value)) {
    opt.generalisedDEfficiency = Math.exp(opt.value / base.parameters) / base.runs;
  }
  return { runs, diagnostics, method: spec.method, model, terms: terms.map((t) => t.label), seed };
}

/** Add `runs` new runs to runs already made (or planned), chosen by the optimal-design search. */
export function augmentDesign(spec: DesignSpec & { existingRuns: Point[]; runs: number }, options: OptimalDesignOptions = {}): DesignResult {
  return generateDesign({ ...spec, method: 'optimal' }, options);
}
