/** Computations a request awaits, run in the worker pool so the server's event loop stays free. */
import { generateDesign, type DesignResult, type DesignSpec } from '@/domain/design';
import type { SuggestionRequest, SuggestionResult } from '@/domain/surrogate';
import { runInPool } from './pool';

/** generateDesign, with the optimal method (a search) sent to the pool; the constructions are quick and run here. */
export async function designOffThread(spec: DesignSpec): Promise<DesignResult> {
  if (spec.method !== 'optimal') return generateDesign(spec);
  return (await runInPool('design', spec)).result as DesignResult;
}

export async function suggestionsOffThread(request: SuggestionRequest): Promise<SuggestionResult> {
  return (await runInPool('suggestions', request)).result as SuggestionResult;
}
