// Sortable column headers shared by the client tables (Ward overview, Stream health): a header cell whose aria-sort
// follows the active key(s) of its column, keyboard buttons that sort by one key, and the sort state behind them.
import { useState } from "react";

export type SortDirection = "ascending" | "descending";

export interface SortState<K extends string> {
  key: K;
  direction: SortDirection;
}

/**
 * The table's sort: a click on the active key turns its direction round; a click on another key sorts by it in that
 * key's first direction.
 */
export function useSort<K extends string>(initial: SortState<K>, firstDirection: (key: K) => SortDirection) {
  const [sort, setSort] = useState<SortState<K>>(initial);
  const onSort = (key: K) =>
    setSort((s) =>
      s.key === key ? { key, direction: s.direction === "ascending" ? "descending" : "ascending" } : { key, direction: firstDirection(key) },
    );
  return { sort, onSort };
}

function SortIcon({ direction }: { direction: SortDirection | null }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 12 16" className="h-4 w-3 shrink-0">
      <path d="M6 1.5L10 6H2z" fill={direction === "ascending" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.2" />
      <path d="M6 14.5L10 10H2z" fill={direction === "descending" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.2" />
    </svg>
  );
}

export function SortButton<K extends string>({ sortKey, sort, onSort, children, className = "" }: {
  sortKey: K;
  sort: SortState<K>;
  onSort: (k: K) => void;
  children: React.ReactNode;
  className?: string;
}) {
  const active = sort.key === sortKey;
  return (
    <button
      type="button"
      onClick={() => onSort(sortKey)}
      className={`inline-flex min-h-6 min-w-6 cursor-pointer items-center gap-1 rounded px-1 py-0.5 text-left font-bold hover:text-ink ${active ? "text-ink underline decoration-accent decoration-2 underline-offset-4" : ""} ${className}`}
    >
      {children}
      <SortIcon direction={active ? sort.direction : null} />
    </button>
  );
}

/** A header whose aria-sort follows the column's active sort key(s). */
export function SortableHeader<K extends string>({ keys, sort, children, className = "" }: {
  keys: K[];
  sort: SortState<K>;
  children: React.ReactNode;
  className?: string;
}) {
  return (
    <th scope="col" aria-sort={keys.includes(sort.key) ? sort.direction : "none"} className={`align-bottom ${className}`}>
      {children}
    </th>
  );
}
