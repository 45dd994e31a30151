import type { ReactNode } from 'react';
import { cn } from '@/utils/cn';

/** A column heading: its text, or its text with classes of its own (alignment, hidden on a phone). */
export type HeadCell = string | LabelledHead;
export interface LabelledHead {
  label: ReactNode;
  className?: string;
  key?: string;
}

/** A heading aligned with a column of figures. */
export const figureHead = (label: string, className?: string): LabelledHead => ({ label, className: cn('text-right', className) });

/** A heading for a column of buttons, read out but not shown. */
export const hiddenHead = (label: string): LabelledHead => ({ label: <span className="sr-only">{label}</span>, key: label });

export interface TableHeadProps {
  cells: readonly HeadCell[];
  /** Classes of the `thead`. */
  className?: string;
  /** Classes every heading cell shares. */
  cellClassName?: string;
}

/** The heading row of a short table written by hand (a summary, a preview): the columns as data, mapped once. */
export const TableHead = ({ cells, className, cellClassName }: TableHeadProps) => (
  <thead className={className}>
    <tr>
      {cells.map((cell, index) => {
        const { label, className: own, key } = typeof cell === 'string' ? { label: cell, className: undefined, key: cell } : cell;
        return (
          <th key={key ?? (typeof label === 'string' ? label : index)} scope="col" className={cn(cellClassName, own)}>
            {label}
          </th>
        );
      })}
    </tr>
  </thead>
);

/** The one row of a hand-written table with nothing to list. */
export const EmptyRow = ({ colSpan, children, className = 'py-8' }: { colSpan: number; children: ReactNode; className?: string }) => (
  <tr>
    <td colSpan={colSpan} className={cn('px-3 text-center text-ink-muted', className)}>
      {children}
    </td>
  </tr>
);
