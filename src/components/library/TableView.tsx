// The library's table body on TanStack Table: sortable headers (server-side), rows you move through with ↑/↓,
// open with Enter and select with Space, and the pager underneath.
import { useRef, useState, type KeyboardEvent, type ReactNode } from 'react';
import { flexRender, type Table } from '@tanstack/react-table';
import { Spinner } from '../shared/form';

/** Per-column extras: which API sort key the header toggles, and cell classes. */
export interface ColumnMeta {
  sortKey?: string;
  className?: string;
  headClassName?: string;
}

interface Props<T> {
  table: Table<T>;
  label: string;
  testId: string;
  sort: string;
  order: 'asc' | 'desc';
  onSort: (key: string) => void;
  onOpen: (row: T) => void;
  onToggle?: (row: T) => void;
  isSelected?: (row: T) => boolean;
  rowClassName?: (row: T) => string;
  fetching: boolean;
  empty: ReactNode;
}

/** Is the key press aimed at a control inside the row (a select, a link, a checkbox), not the row itself? */
function fromControl(event: KeyboardEvent) {
  return event.target !== event.currentTarget;
}

export function TableView<T>({ table, label, testId, sort, order, onSort, onOpen, onToggle, isSelected, rowClassName, fetching, empty }: Props<T>) {
  const body = useRef<HTMLTableSectionElement>(null);
  const [focusIndex, setFocusIndex] = useState(0);
  const rows = table.getRowModel().rows;
  const focusRow = (i: number) => {
    const next = Math.max(0, Math.min(rows.length - 1, i));
    setFocusIndex(next);
    body.current?.querySelectorAll<HTMLTableRowElement>('tr[data-row]')[next]?.focus();
  };

  const onKeyDown = (event: KeyboardEvent<HTMLTableRowElement>, index: number, original: T) => {
    if (event.key === 'ArrowDown' || event.key === 'ArrowUp') {
      // Arrows move between rows from anywhere in a row except an open select.
      if (fromControl(event) && (event.target as HTMLElement).tagName === 'SELECT') return;
      event.preventDefault();
      focusRow(index + (event.key === 'ArrowDown' ? 1 : -1));
    } else if (event.key === 'Home' && !fromControl(event)) {
      event.preventDefault();
      focusRow(0);
    } else if (event.key === 'End' && !fromControl(event)) {
      event.preventDefault();
      focusRow(rows.length - 1);
    } else if (event.key === 'Enter' && !fromControl(event)) {
      event.preventDefault();
      onOpen(original);
    } else if (event.key === ' ' && !fromControl(event) && onToggle) {
      event.preventDefault();
      onToggle(original);
    }
  };

  return (
    <div className="card relative overflow-x-auto">
      {fetching && (
        <div className="absolute top-3 right-3 z-10 text-harbour-600" role="status" aria-label="Loading">
          <Spinner />
        </div>
      )}
      <table data-testid={testId} aria-label={label} aria-busy={fetching || undefined} className="w-full min-w-[44rem] text-left text-sm">
        <thead className="border-b border-sand-line text-xs tracking-wide text-ink-muted uppercase">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const meta = (header.column.columnDef.meta ?? {}) as ColumnMeta;
                const active = meta.sortKey && meta.sortKey === sort;
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={active ? (order === 'asc' ? 'ascending' : 'descending') : undefined}
                    className={`px-3 py-2.5 font-medium first:pl-5 last:pr-5 ${meta.headClassName ?? ''}`}
                  >
                    {meta.sortKey ? (
                      <button
                        type="button"
                        onClick={() => onSort(meta.sortKey!)}
                        className={`-mx-1.5 inline-flex items-center gap-1 rounded px-1.5 py-0.5 uppercase hover:bg-sand-deep hover:text-ink ${active ? 'text-ink' : ''}`}
                      >
                        {flexRender(header.column.columnDef.header, header.getContext())}
                        <SortMark state={active ? order : null} />
                      </button>
                    ) : (
                      flexRender(header.column.columnDef.header, header.getContext())
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody ref={body} className="divide-y divide-sand-line/70">
          {rows.length === 0 && (
            <tr>
              <td colSpan={table.getAllLeafColumns().length} className="px-5 py-10 text-center text-ink-soft">
                {empty}
              </td>
            </tr>
          )}
          {rows.map((row, index) => {
            const selected = isSelected?.(row.original) ?? false;
            return (
              <tr
                key={row.id}
                data-row
                tabIndex={index === Math.min(focusIndex, rows.length - 1) ? 0 : -1}
                aria-selected={onToggle ? selected : undefined}
                onFocus={() => setFocusIndex(index)}
                onKeyDown={(e) => onKeyDown(e, index, row.original)}
                onClick={(e) => {
                  // A click on the row opens it, unless it lands on a control (link, button, select, checkbox).
                  if ((e.target as HTMLElement).closest('a, button, select, input, label')) return;
                  onOpen(row.original);
                }}
                className={`group cursor-pointer align-middle outline-none hover:bg-sand/60 focus-visible:bg-harbour-50 focus-visible:shadow-[inset_3px_0_0_var(--color-harbour-500)] ${
                  selected ? 'bg-harbour-50/70' : ''
                } ${rowClassName?.(row.original) ?? ''}`}
              >
                {row.getVisibleCells().map((cell) => {
                  const meta = (cell.column.columnDef.meta ?? {}) as ColumnMeta;
                  return (
                    <td key={cell.id} className={`px-3 py-2.5 first:pl-5 last:pr-5 ${meta.className ?? ''}`}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  );
                })}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function SortMark({ state }: { state: 'asc' | 'desc' | null }) {
  return (
    <svg width="9" height="12" viewBox="0 0 9 12" aria-hidden="true" className="shrink-0">
      <path d="M4.5 1 8 5H1z" fill="currentColor" opacity={state === 'asc' ? 1 : 0.25} />
      <path d="M4.5 11 1 7h7z" fill="currentColor" opacity={state === 'desc' ? 1 : 0.25} />
    </svg>
  );
}

/** Page n of m, the range shown, page size, previous/next. */
export function Pager({
  page,
  pageSize,
  total,
  noun,
  onPage,
  onPageSize,
}: {
  page: number;
  pageSize: number;
  total: number;
  noun: [string, string];
  onPage: (page: number) => void;
  onPageSize: (size: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const from = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const to = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages" className="mt-3 flex flex-wrap items-center justify-between gap-3 text-sm text-ink-soft">
      <p aria-live="polite">
        {total === 0 ? `No ${noun[1]}` : `${from}–${to} of ${total} ${total === 1 ? noun[0] : noun[1]}`}
      </p>
      <div className="flex items-center gap-2">
        <label className="flex items-center gap-2">
          <span>Rows</span>
          <select className="field-input w-auto py-1 pr-7" value={pageSize} onChange={(e) => onPageSize(Number(e.target.value))}>
            {[10, 25, 50, 100].map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </select>
        </label>
        <button type="button" className="btn-quiet px-3 py-1.5" disabled={page <= 1} onClick={() => onPage(page - 1)}>
          <span aria-hidden="true">←</span> Previous
        </button>
        <span className="px-1 tabular-nums">
          {page} / {pages}
        </span>
        <button type="button" className="btn-quiet px-3 py-1.5" disabled={page >= pages} onClick={() => onPage(page + 1)}>
          Next <span aria-hidden="true">→</span>
        </button>
      </div>
    </nav>
  );
}

/** A search box that reports its text after a short pause. */
export function SearchBox({ value, onSearch, label }: { value: string; onSearch: (text: string) => void; label: string }) {
  const [text, setText] = useState(value);
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  return (
    <label className="relative block min-w-[14rem] flex-1 sm:max-w-xs">
      <span className="sr-only">{label}</span>
      <svg width="15" height="15" viewBox="0 0 16 16" aria-hidden="true" className="pointer-events-none absolute top-1/2 left-3 -translate-y-1/2 text-ink-muted">
        <circle cx="7" cy="7" r="4.75" fill="none" stroke="currentColor" strokeWidth="1.5" />
        <path d="M10.6 10.6 14 14" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
      </svg>
      <input
        type="search"
        value={text}
        placeholder={label}
        className="field-input py-1.5 pl-9"
        onChange={(e) => {
          const next = e.target.value;
          setText(next);
          clearTimeout(timer.current);
          timer.current = setTimeout(() => onSearch(next.trim()), 250);
        }}
      />
    </label>
  );
}
