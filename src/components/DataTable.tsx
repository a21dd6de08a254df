import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  filterFn_equals,
  filterFn_includesString,
  globalFilteringFeature,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  sortFn_text,
  tableFeatures,
  useTable,
  type ColumnDef,
  type ColumnFiltersState,
  type RowData,
  type SortingState,
} from '@tanstack/react-table';
import { useState, type ReactNode } from 'react';
import { SortableTh, Table, Td, Th } from './Table';

/**
 * The features every data table here uses (TanStack Table v9 registers them
 * explicitly): client-side sorting, per-column filters and one search box.
 */
export const dataTableFeatures = tableFeatures({
  rowSortingFeature,
  columnFilteringFeature,
  globalFilteringFeature,
  sortedRowModel: createSortedRowModel(),
  filteredRowModel: createFilteredRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, text: sortFn_text, basic: sortFn_basic },
  filterFns: { includesString: filterFn_includesString, equals: filterFn_equals },
  columnMeta: {} as { numeric?: boolean; label?: string; className?: string },
});
export type DataTableFeatures = typeof dataTableFeatures;

export function dataColumnHelper<T extends RowData>() {
  return createColumnHelper<DataTableFeatures, T>();
}

export type DataColumn<T extends RowData> = ColumnDef<DataTableFeatures, T, never>;

/**
 * A compact, sortable, filterable table over TanStack Table. Columns say how
 * they sort and filter; the caller owns the filter controls and passes their
 * state in. Rows can be marked as selected (the detail shown beside the table).
 */
export function DataTable<T extends RowData>({
  caption,
  columns,
  data,
  globalFilter,
  columnFilters,
  initialSorting = [],
  rowId,
  selectedId,
  empty,
  captionHidden = true,
}: {
  caption: string;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<DataTableFeatures, T, any>[];
  data: T[];
  globalFilter?: string;
  columnFilters?: ColumnFiltersState;
  initialSorting?: SortingState;
  rowId: (row: T) => string;
  selectedId?: string | null;
  empty?: ReactNode;
  captionHidden?: boolean;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const table = useTable({
    features: dataTableFeatures,
    columns,
    data,
    getRowId: (r: T) => rowId(r),
    globalFilterFn: 'includesString',
    state: { sorting, globalFilter: globalFilter ?? '', columnFilters: columnFilters ?? [] },
    onSortingChange: setSorting,
  });
  const rows = table.getRowModel().rows;
  return (
    <Table caption={caption} captionHidden={captionHidden}>
      <thead>
        {table.getHeaderGroups().map((group) => (
          <tr key={group.id}>
            {group.headers.map((header) => {
              const meta = header.column.columnDef.meta;
              const label = meta?.label ?? (typeof header.column.columnDef.header === 'string' ? header.column.columnDef.header : header.id);
              if (header.isPlaceholder) return <Th key={header.id} />;
              if (!header.column.getCanSort())
                return (
                  <Th key={header.id} numeric={meta?.numeric}>
                    <table.FlexRender header={header} />
                  </Th>
                );
              const dir = header.column.getIsSorted();
              return (
                <SortableTh
                  key={header.id}
                  label={label}
                  numeric={meta?.numeric}
                  active={dir !== false}
                  direction={dir === 'desc' ? 'descending' : 'ascending'}
                  onSort={() => header.column.toggleSorting(dir === 'asc', false)}
                />
              );
            })}
          </tr>
        ))}
      </thead>
      <tbody>
        {rows.length === 0 ? (
          <tr>
            <Td colSpan={table.getAllLeafColumns().length} className="py-4 text-center text-sm text-muted">
              {empty ?? 'Nothing matches the filters.'}
            </Td>
          </tr>
        ) : (
          rows.map((row) => (
            <tr key={row.id} aria-selected={selectedId !== undefined ? row.id === selectedId : undefined} className={row.id === selectedId ? 'bg-accent-soft/70' : 'hover:bg-surface-sunken/40'}>
              {row.getAllCells().map((cell) => (
                <Td key={cell.id} numeric={cell.column.columnDef.meta?.numeric} className={cell.column.columnDef.meta?.className}>
                  <table.FlexRender cell={cell} />
                </Td>
              ))}
            </tr>
          ))
        )}
      </tbody>
    </Table>
  );
}
