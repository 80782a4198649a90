/** Database rows ↔ domain values. JSON-valued columns are text in both databases. */
import type { Factor, Point, ResponseDefinition } from '@/domain/factors';
import type { Factor as FactorRow, Response as ResponseRow, Run as RunRow } from '@/generated/sqlite/client';

export function parseJson<T>(text: string | null | undefined, fallback: T): T {
  if (!text) return fallback;
  try {
    return JSON.parse(text) as T;
  } catch {
    return fallback;
  }
}

export function toFactor(row: FactorRow): Factor {
  const base = { name: row.name, unit: row.unit || undefined, hardToChange: row.hardToChange };
  if (row.kind === 'continuous') return { ...base, kind: 'continuous', low: row.low ?? 0, high: row.high ?? 1 };
  if (row.kind === 'discrete') return { ...base, kind: 'discrete', values: parseJson<number[]>(row.valuesJson, []) };
  return { ...base, kind: 'categorical', levels: parseJson<string[]>(row.valuesJson, []) };
}

export function toResponse(row: ResponseRow): ResponseDefinition {
  return {
    name: row.name,
    unit: row.unit || undefined,
    goal: row.goal as ResponseDefinition['goal'],
    target: row.target ?? undefined,
    lower: row.lower ?? undefined,
    upper: row.upper ?? undefined,
  };
}

export interface RunView {
  id: string;
  runNumber: number;
  plannedOrder: number;
  values: Point;
  block: number | null;
  wholePlot: number | null;
  source: string;
  designId: string | null;
}

export function toRunView(row: RunRow): RunView {
  return {
    id: row.id,
    runNumber: row.runNumber,
    plannedOrder: row.plannedOrder,
    values: parseJson<Point>(row.valuesJson, {}),
    block: row.block,
    wholePlot: row.wholePlot,
    source: row.source,
    designId: row.designId,
  };
}
