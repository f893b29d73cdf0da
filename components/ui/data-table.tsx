'use client';

import Link from 'next/link';
import { useMemo, useState, type ReactNode } from 'react';
import {
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type FilterFn,
  type SortingState,
} from '@tanstack/react-table';
import { Badge } from './primitives';

/**
 * A cell: text or a number, or an object with the text (what the filter and the sort read), a link, a badge
 * tone or swatch, or `node` (controls such as a select or buttons) shown instead of the text.
 */
export type Cell =
  | string
  | number
  | null
  | { text: string; href?: string; tone?: 'ok' | 'warn' | 'bad' | 'info' | 'muted'; swatch?: string; sort?: string | number; node?: ReactNode };

export interface Column {
  key: string;
  label: string;
  align?: 'left' | 'right';
  /**
   * On a phone each row becomes a card: the first column is its title, priority 1 (status, review) comes
   * right under it, 2 (the default) below, and 3 only on wider screens. No sideways scrolling.
   */
  priority?: 1 | 2 | 3;
}

/** The classes that turn a cell into a labelled line of a card below the `sm` breakpoint. */
function phoneCell(c: Column, first: boolean): string {
  if (first) return 'col-span-2 order-[-2] pr-8 font-medium sm:order-none sm:pr-3 sm:font-normal';
  const label = 'before:block before:text-[11px] before:font-semibold before:uppercase before:tracking-wide before:text-ink-faint before:content-[attr(data-label)] sm:before:content-none';
  const order = c.priority === 1 ? 'order-[-1] sm:order-none' : '';
  const hide = c.priority === 3 ? 'hidden sm:table-cell' : 'empty:hidden sm:empty:table-cell';
  return `${label} ${order} ${hide}`;
}

export interface Row {
  id: string;
  cells: Record<string, Cell>;
}

const text = (c: Cell): string => (c === null ? '' : typeof c === 'object' ? c.text : String(c));
const sortKey = (c: Cell): string | number =>
  c === null ? '' : typeof c === 'object' ? (c.sort ?? c.text) : c;

/** Rows picked with a checkbox each (and one for every row shown), for an action on many rows at once. */
export interface Selection {
  selected: ReadonlySet<string>;
  onChange: (next: Set<string>) => void;
  /** rows that cannot be picked get no checkbox */
  canSelect?: (row: Row) => boolean;
  /** how a row is named to a screen reader, e.g. "Select E-1 0–40 m" */
  rowLabel: (row: Row) => string;
}

/**
 * A table that sorts by any column (click the header) and filters on every cell's text; optionally rows
 * can be picked (`selection`), and `toolbar` gets the rows the filter shows, for actions on them.
 */
const PAGE_SIZE = 50;

/** The filter box matches any cell's text, ignoring case. */
const anyCellText: FilterFn<Row> = (row, _columnId, value: string) => {
  const f = value.trim().toLowerCase();
  return !f || Object.values(row.original.cells).some((c) => text(c).toLowerCase().includes(f));
};

/**
 * A table that sorts by any column (click the header), filters on every cell's text and pages by 50
 * (TanStack Table holds that state; the markup is ours); optionally rows can be picked (`selection`), and
 * `toolbar` gets the rows the filter shows, for actions on them.
 */
export function DataTable({ columns, rows, label, empty = 'Nothing here yet.', selection, toolbar, pageSize = PAGE_SIZE }: { columns: Column[]; rows: Row[]; label: string; empty?: string; selection?: Selection; toolbar?: (shown: Row[]) => ReactNode; pageSize?: number }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState('');
  const defs = useMemo<ColumnDef<Row>[]>(
    () =>
      columns.map((c) => ({
        id: c.key,
        accessorFn: (r: Row) => sortKey(r.cells[c.key] ?? null),
        sortingFn: (a, b, id) => {
          const x = a.getValue<string | number>(id);
          const y = b.getValue<string | number>(id);
          return typeof x === 'number' && typeof y === 'number' ? x - y : String(x).localeCompare(String(y));
        },
        sortDescFirst: false,
      })),
    [columns],
  );
  const table = useReactTable({
    data: rows,
    columns: defs,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: anyCellText,
    getRowId: (r) => r.id,
    getCoreRowModel: getCoreRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageIndex: 0, pageSize } },
    autoResetPageIndex: true,
  });
  const shown = table.getPrePaginationRowModel().rows.map((r) => r.original);
  const page = table.getRowModel().rows.map((r) => r.original);
  const sort = sorting[0] ? { key: sorting[0].id, dir: sorting[0].desc ? -1 : 1 } : null;
  const setSort = (next: { key: string; dir: 1 | -1 }) => setSorting([{ id: next.key, desc: next.dir === -1 }]);
  const pages = table.getPageCount();

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
      {toolbar?.(shown)}
      <div className="overflow-x-auto rounded-lg border border-ink/10 bg-paper-raised">
        <table className="block w-full text-sm sm:table sm:min-w-full" aria-label={label}>
          <thead className="hidden bg-paper-sunk text-left text-xs uppercase tracking-wide text-ink-soft sm:table-header-group">
            <tr>
              {selection && <th scope="col" className="w-8 px-3 py-2"><SelectAll shown={shown} selection={selection} /></th>}
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
          <tbody className="block divide-y divide-ink/5 sm:table-row-group">
            {page.map((r) => (
              <tr key={r.id} className="relative grid grid-cols-2 gap-x-3 gap-y-2 px-3 py-3 hover:bg-paper/60 sm:static sm:table-row sm:p-0">
                {selection && (
                  <td className="absolute right-3 top-3 block sm:static sm:table-cell sm:px-3 sm:py-2 sm:align-top">
                    {(selection.canSelect?.(r) ?? true) && (
                      <input type="checkbox" aria-label={selection.rowLabel(r)} checked={selection.selected.has(r.id)} onChange={(e) => {
                        const next = new Set(selection.selected);
                        if (e.target.checked) next.add(r.id);
                        else next.delete(r.id);
                        selection.onChange(next);
                      }} />
                    )}
                  </td>
                )}
                {columns.map((c, i) => {
                  const cell = r.cells[c.key] ?? null;
                  return (
                    <td key={c.key} data-label={c.label} className={`block min-w-0 break-words sm:table-cell sm:px-3 sm:py-2 sm:align-top ${phoneCell(c, i === 0)} ${c.align === 'right' ? 'tabular-nums sm:whitespace-nowrap sm:text-right' : ''}`}>
                      {cell !== null && typeof cell === 'object' ? (
                        cell.node !== undefined ? (
                          cell.node
                        ) : cell.href ? (
                          <Link href={cell.href}>{cell.text}</Link>
                        ) : cell.tone || cell.swatch ? (
                          <Badge tone={cell.tone} swatch={cell.swatch}>{cell.text}</Badge>
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
              <tr className="block sm:table-row">
                <td colSpan={columns.length + (selection ? 1 : 0)} className="block px-3 py-6 text-center text-ink-faint sm:table-cell">
                  {rows.length === 0 ? empty : 'No rows match the filter.'}
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center gap-3 text-xs text-ink-faint">
        <p>
          {shown.length} of {rows.length} shown
        </p>
        {pages > 1 && (
          <nav aria-label={`Pages of ${label}`} className="flex items-center gap-2">
            <button type="button" className="min-h-10 rounded border border-ink/15 px-3 disabled:opacity-50" disabled={!table.getCanPreviousPage()} onClick={() => table.previousPage()}>
              Previous
            </button>
            <span>
              Page {table.getState().pagination.pageIndex + 1} of {pages}
            </span>
            <button type="button" className="min-h-10 rounded border border-ink/15 px-3 disabled:opacity-50" disabled={!table.getCanNextPage()} onClick={() => table.nextPage()}>
              Next
            </button>
          </nav>
        )}
      </div>
    </div>
  );
}

/** The header's checkbox: picks (or drops) every pickable row the filter shows. */
function SelectAll({ shown, selection }: { shown: Row[]; selection: Selection }) {
  const pickable = shown.filter((r) => selection.canSelect?.(r) ?? true);
  const all = pickable.length > 0 && pickable.every((r) => selection.selected.has(r.id));
  return (
    <input
      type="checkbox"
      aria-label="Select every row shown"
      disabled={pickable.length === 0}
      checked={all}
      onChange={() => {
        const next = new Set(selection.selected);
        for (const r of pickable) {
          if (all) next.delete(r.id);
          else next.add(r.id);
        }
        selection.onChange(next);
      }}
    />
  );
}
