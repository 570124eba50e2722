// Headless table logic: sorting and paging with no opinion about how rows are drawn, so the same
// state drives a table on wide screens and a list of cards on phones.
import { useMemo, useState } from 'react';

export type SortDirection = 'ascending' | 'descending';

export interface SortSpec {
  key: string;
  direction: SortDirection;
}

/** A sortable column: how to read the value it sorts by (null sorts last either way). */
export interface SortColumn<R> {
  key: string;
  /** Words for the sort control, e.g. "File name". */
  title: string;
  value: (row: R) => string | number | null;
  /** Direction a first click sorts in (default ascending; dates and sizes read best newest/largest first). */
  firstDirection?: SortDirection;
}

export function compareValues(a: string | number | null, b: string | number | null): number {
  if (a === null && b === null) return 0;
  if (a === null) return 1;
  if (b === null) return -1;
  if (typeof a === 'number' && typeof b === 'number') return a - b;
  return String(a).localeCompare(String(b), undefined, { numeric: true, sensitivity: 'base' });
}

/** Rows sorted by one column (stable: equal values keep their incoming order); nulls last. */
export function sortRows<R>(rows: readonly R[], columns: readonly SortColumn<R>[], sort: SortSpec | null): R[] {
  const col = sort ? columns.find((c) => c.key === sort.key) : undefined;
  if (!col || !sort) return rows.slice();
  const sign = sort.direction === 'ascending' ? 1 : -1;
  return rows
    .map((row, i) => ({ row, i, v: col.value(row) }))
    .sort((x, y) => {
      if (x.v === null || y.v === null) return compareValues(x.v, y.v) || x.i - y.i;
      return sign * compareValues(x.v, y.v) || x.i - y.i;
    })
    .map((x) => x.row);
}

export interface PageInfo {
  page: number;
  pageCount: number;
  /** 1-based positions of the first and last row shown, and the total. */
  first: number;
  last: number;
  total: number;
}

export function pageOf<R>(rows: readonly R[], page: number, pageSize: number): { rows: R[]; info: PageInfo } {
  const total = rows.length;
  const pageCount = Math.max(1, Math.ceil(total / pageSize));
  const p = Math.min(Math.max(0, page), pageCount - 1);
  const slice = rows.slice(p * pageSize, p * pageSize + pageSize);
  return { rows: slice, info: { page: p, pageCount, first: total ? p * pageSize + 1 : 0, last: p * pageSize + slice.length, total } };
}

export interface TableState<R> {
  rows: R[];
  sort: SortSpec | null;
  /** Click on a column: sort by it, or reverse it when it is already the sort. */
  toggleSort: (key: string) => void;
  setSort: (s: SortSpec | null) => void;
  page: PageInfo;
  setPage: (p: number) => void;
}

export function useTableState<R>({
  rows,
  columns,
  initialSort,
  pageSize,
}: {
  rows: readonly R[];
  columns: readonly SortColumn<R>[];
  initialSort: SortSpec | null;
  pageSize: number;
}): TableState<R> {
  const [sort, setSortState] = useState<SortSpec | null>(initialSort);
  const [page, setPage] = useState(0);
  const sorted = useMemo(() => sortRows(rows, columns, sort), [rows, columns, sort]);
  const paged = pageOf(sorted, page, pageSize);
  const setSort = (s: SortSpec | null) => {
    setSortState(s);
    setPage(0);
  };
  const toggleSort = (key: string) => {
    const col = columns.find((c) => c.key === key);
    if (!col) return;
    if (sort?.key === key) setSort({ key, direction: sort.direction === 'ascending' ? 'descending' : 'ascending' });
    else setSort({ key, direction: col.firstDirection ?? 'ascending' });
  };
  return { rows: paged.rows, sort, toggleSort, setSort, page: paged.info, setPage };
}
