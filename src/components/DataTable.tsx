'use client';
/**
 * A sortable table over plain rows, built on TanStack Table. Columns are described by serialisable
 * specs so that server components can pass them.
 */
import {
  FlexRender,
  createSortedRowModel,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  tableFeatures,
  useTable,
  type ColumnDef,
} from '@tanstack/react-table';
import { useMemo } from 'react';

export interface ColumnSpec {
  key: string;
  header: string;
  /** 'number' (significant digits via `digits`), 'fixed' (decimals via `digits`), 'p' (p-value), 'text'. */
  format?: 'number' | 'fixed' | 'p' | 'text';
  digits?: number;
  align?: 'left' | 'right';
}

export type Row = Record<string, unknown>;

const features = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  sortFns: { basic: sortFn_basic, alphanumeric: sortFn_alphanumeric },
});

export function formatCell(value: unknown, spec: Pick<ColumnSpec, 'format' | 'digits'>): string {
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) return value > 0 ? '∞' : value < 0 ? '−∞' : '—';
    switch (spec.format) {
      case 'fixed':
        return value.toFixed(spec.digits ?? 2);
      case 'p':
        return value < 1e-4 ? '< 0.0001' : value.toFixed(4);
      case 'text':
        return String(value);
      default:
        return Number(value.toPrecision(spec.digits ?? 4)).toString();
    }
  }
  if (Array.isArray(value)) return value.map((v) => formatCell(v, spec)).join(' … ');
  return String(value);
}

export function DataTable({ columns, rows, caption, testId }: { columns: ColumnSpec[]; rows: Row[]; caption?: string; testId?: string }) {
  const defs = useMemo<ColumnDef<typeof features, Row>[]>(
    () =>
      columns.map((c) => ({
        id: c.key,
        accessorFn: (r: Row) => r[c.key] as never,
        header: c.header,
        cell: (info) => formatCell(info.getValue(), c),
        sortFn: c.format === 'text' ? 'alphanumeric' : 'basic',
      })),
    [columns],
  );
  const table = useTable({ features, columns: defs, data: rows });
  return (
    <div className="table-wrap">
      <table className="data" data-testid={testId}>
        {caption ? <caption>{caption}</caption> : null}
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => {
                const spec = columns.find((c) => c.key === h.column.id);
                const sorted = h.column.getIsSorted();
                return (
                  <th key={h.id} className={spec?.align === 'right' || (spec?.format && spec.format !== 'text') ? 'num' : undefined}>
                    <button type="button" className="sort" onClick={h.column.getToggleSortingHandler()}>
                      <FlexRender header={h} />
                      {sorted === 'asc' ? ' ▲' : sorted === 'desc' ? ' ▼' : ''}
                    </button>
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr key={r.id}>
              {r.getAllCells().map((cell) => {
                const spec = columns.find((c) => c.key === cell.column.id);
                return (
                  <td key={cell.id} className={spec?.align === 'right' || (spec?.format && spec.format !== 'text') ? 'num' : undefined}>
                    <FlexRender cell={cell} />
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
      {rows.length === 0 ? <p className="muted">Nothing here yet.</p> : null}
    </div>
  );
}
