'use client';

import Link from 'next/link';
import { useMemo, useState } from 'react';
import { Badge } from './primitives';

export type Cell =
  | string
  | number
  | null
  | { text: string; href?: string; tone?: 'ok' | 'warn' | 'bad' | 'info' | 'muted'; sort?: string | number };

export interface Column {
  key: string;
  label: string;
  align?: 'left' | 'right';
}

export interface Row {
  id: string;
  cells: Record<string, Cell>;
}

const text = (c: Cell): string => (c === null ? '' : typeof c === 'object' ? c.text : String(c));
const sortKey = (c: Cell): string | number =>
  c === null ? '' : typeof c === 'object' ? (c.sort ?? c.text) : c;

/** A table that sorts by any column (click the header) and filters on every cell's text. */
export function DataTable({ columns, rows, label, empty = 'Nothing here yet.' }: { columns: Column[]; rows: Row[]; label: string; empty?: string }) {
  const [sort, setSort] = useState<{ key: string; dir: 1 | -1 } | null>(null);
  const [filter, setFilter] = useState('');

  const shown = useMemo(() => {
    const f = filter.trim().toLowerCase();
    let out = f ? rows.filter((r) => columns.some((c) => text(r.cells[c.key] ?? null).toLowerCase().includes(f))) : rows;
    if (sort) {
      out = [...out].sort((a, b) => {
        const x = sortKey(a.cells[sort.key] ?? null);
        const y = sortKey(b.cells[sort.key] ?? null);
        const d = typeof x === 'number' && typeof y === 'number' ? x - y : String(x).localeCompare(String(y));
        return d * sort.dir;
      });
    }
    return out;
  }, [rows, columns, sort, filter]);

  return (
    <div className="space-y-3">
      <input
        type="search"
        aria-label={`Filter ${label}`}
        placeholder="Filter…"
        value={filter}
        onChange={(e) => setFilter(e.target.value)}
        className="w-full max-w-xs rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm"
      />
      <div className="overflow-x-auto rounded-lg border border-ink/10 bg-paper-raised">
        <table className="min-w-full text-sm" aria-label={label}>
          <thead className="bg-paper-sunk text-left text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              {columns.map((c) => {
                const active = sort?.key === c.key;
                return (
                  <th
                    key={c.key}
                    scope="col"
                    aria-sort={active ? (sort!.dir === 1 ? 'ascending' : 'descending') : 'none'}
                    className={`px-3 py-2 font-semibold ${c.align === 'right' ? 'text-right' : ''}`}
                  >
                    <button
                      type="button"
                      className="inline-flex items-center gap-1 uppercase"
                      onClick={() => setSort(active && sort!.dir === 1 ? { key: c.key, dir: -1 } : { key: c.key, dir: 1 })}
                    >
                      {c.label}
                      <span aria-hidden="true" className="text-ink-faint">
                        {active ? (sort!.dir === 1 ? '▲' : '▼') : '↕'}
                      </span>
                    </button>
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink/5">
            {shown.map((r) => (
              <tr key={r.id} className="hover:bg-paper/60">
                {columns.map((c) => {
                  const cell = r.cells[c.key] ?? null;
                  return (
                    <td key={c.key} className={`px-3 py-2 align-top ${c.align === 'right' ? 'whitespace-nowrap text-right tabular-nums' : ''}`}>
                      {cell !== null && typeof cell === 'object' ? (
                        cell.href ? (
                          <Link href={cell.href}>{cell.text}</Link>
                        ) : cell.tone ? (
                          <Badge tone={cell.tone}>{cell.text}</Badge>
                        ) : (
                          cell.text
                        )
                      ) : (
                        text(cell)
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
            {shown.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-faint">
                  {rows.length === 0 ? empty : 'No rows match the filter.'}
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-ink-faint">
        {shown.length} of {rows.length} shown
      </p>
    </div>
  );
}
