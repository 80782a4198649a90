/**
 * Model refinement: augment the trials already run with the candidates that most improve the
 * determinant of the information matrix of a quadratic model (sequential D-optimal augmentation: each
 * step adds the candidate with the largest scaled prediction variance f(x)ᵀ (FᵀF)⁻¹ f(x), which is the
 * factor by which it multiplies |FᵀF|, then updates the inverse by Sherman–Morrison).
 */
// Dykstra (1971), Technometrics 13:682-688 (sequential D-optimal augmentation)
import { Matrix, inverse } from 'ml-matrix';
import { compileModel, standardTerms, type Factor } from '../factors';

export interface RefinePick {
  coded: Float64Array;
  /** f(x)ᵀ M⁻¹ f(x) of the design before this pick. */
  predictionVariance: number;
}

/** Scaled prediction variance f(x)ᵀ(FᵀF)⁻¹f(x) of each pick, given the observed runs and the picks before it. */
export function sequentialPredictionVariances(factors: readonly Factor[], observed: readonly ArrayLike<number>[], picks: readonly ArrayLike<number>[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < picks.length; i++) {
    const [first] = refineDesignCandidates(factors, [...observed, ...picks.slice(0, i)].map((p) => Float64Array.from(p)), [Float64Array.from(picks[i]!)], 1);
    out.push(first!.predictionVariance);
  }
  return out;
}

export function refineDesignCandidates(factors: readonly Factor[], observed: readonly Float64Array[], candidates: readonly Float64Array[], count: number): RefinePick[] {
  const model = compileModel(factors, standardTerms(factors, 'quadratic'));
  const p = model.p;
  const m = new Matrix(p, p);
  const row = new Float64Array(p);
  for (const x of observed) {
    model.row(x, row);
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) m.set(i, j, m.get(i, j) + row[i]! * row[j]!);
  }
  // A small ridge keeps the inverse defined while there are fewer distinct trials than model terms.
  let trace = 0;
  for (let i = 0; i < p; i++) trace += m.get(i, i);
  const ridge = 1e-9 * Math.max(1, trace / p);
  for (let i = 0; i < p; i++) m.set(i, i, m.get(i, i) + ridge);
  const inv = inverse(m).to2DArray();
  const rows = candidates.map((c) => model.row(c, new Float64Array(p)));
  const picks: RefinePick[] = [];
  const taken = new Uint8Array(candidates.length);
  const mf = new Float64Array(p);
  for (let step = 0; step < count; step++) {
    let best = -1;
    let bestValue = -Infinity;
    for (let c = 0; c < candidates.length; c++) {
      if (taken[c]) continue;
      const f = rows[c]!;
      let v = 0;
      for (let i = 0; i < p; i++) {
        let s = 0;
        const ri = inv[i]!;
        for (let j = 0; j < p; j++) s += ri[j]! * f[j]!;
        v += f[i]! * s;
      }
      if (v > bestValue + 1e-12) {
        bestValue = v;
        best = c;
      }
    }
    if (best < 0) break;
    taken[best] = 1;
    picks.push({ coded: candidates[best]!, predictionVariance: bestValue });
    // Sherman–Morrison: (M + f fᵀ)⁻¹ = M⁻¹ − (M⁻¹f)(M⁻¹f)ᵀ / (1 + fᵀM⁻¹f)
    const f = rows[best]!;
    for (let i = 0; i < p; i++) {
      let s = 0;
      for (let j = 0; j < p; j++) s += inv[i]![j]! * f[j]!;
      mf[i] = s;
    }
    const denominator = 1 + bestValue;
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) inv[i]![j] = inv[i]![j]! - (mf[i]! * mf[j]!) / denominator;
  }
  return picks;
}
