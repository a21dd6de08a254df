import type { ReactNode, ThHTMLAttributes, TdHTMLAttributes } from 'react';

/** Compact data table. Numeric cells use `numeric` for tabular figures, right-aligned. */
export function Table({ caption, children, captionHidden = false }: { caption: string; children: ReactNode; captionHidden?: boolean }) {
  return (
    <div className="relative overflow-x-auto rounded-lg border border-line bg-surface-raised">
      <table className="w-full border-collapse text-sm">
        <caption className={captionHidden ? 'sr-only' : 'px-3 py-2 text-left text-sm font-medium text-muted'}>{caption}</caption>
        {children}
      </table>
    </div>
  );
}

export function Th({ children, numeric, flush, className = '', ...rest }: ThHTMLAttributes<HTMLTableCellElement> & { numeric?: boolean; flush?: boolean }) {
  return (
    <th
      scope="col"
      className={`border-b border-line bg-surface-sunken/60 ${flush ? 'p-0' : 'px-3 py-1.5'} text-xs font-semibold tracking-wide text-muted uppercase ${numeric ? 'text-right' : 'text-left'} ${className}`}
      {...rest}
    >
      {children}
    </th>
  );
}

export function Td({ children, numeric, className = '', ...rest }: TdHTMLAttributes<HTMLTableCellElement> & { numeric?: boolean }) {
  return (
    <td className={`border-b border-line/70 px-3 py-1.5 align-middle ${numeric ? 'tabular text-right' : ''} ${className}`} {...rest}>
      {children}
    </td>
  );
}

export type SortDirection = 'ascending' | 'descending';

/** A column header that sorts: a real button inside the <th>, with aria-sort on the header. */
export function SortableTh({
  label,
  active,
  direction,
  onSort,
  numeric,
}: {
  label: string;
  active: boolean;
  direction: SortDirection;
  onSort: () => void;
  numeric?: boolean;
}) {
  return (
    <Th numeric={numeric} flush aria-sort={active ? direction : 'none'}>
      <button
        type="button"
        onClick={onSort}
        className={`inline-flex w-full items-center gap-1 px-3 py-1.5 text-xs font-semibold tracking-wide uppercase hover:text-ink ${
          numeric ? 'justify-end' : ''
        } ${active ? 'text-ink' : 'text-muted'}`}
      >
        {label}
        <span aria-hidden="true" className="inline-block w-3 text-[0.7rem]">
          {active ? (direction === 'ascending' ? '▲' : '▼') : '↕'}
        </span>
      </button>
    </Th>
  );
}
