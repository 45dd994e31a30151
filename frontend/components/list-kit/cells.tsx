import type { ReactNode } from 'react';
import { formatDate, formatDateTime } from '@/utils/format';

/** What a cell renderer needs of TanStack's cell context: the column's value. */
interface ValueOf<V> {
  getValue: () => V;
}

type When = string | null | undefined;

/** Nothing to show: a quiet dash. */
export const Dash = () => <span className="text-ink-muted">—</span>;

/** A moment or a day, on one line, readable by machines too. */
export const Time = ({ value, format = formatDateTime }: { value: When; format?: (value: When) => string }) => (
  <time dateTime={value ?? undefined} className="whitespace-nowrap">
    {format(value)}
  </time>
);

/** A column of days ("3 Dec 2026"). */
export const dateCell = ({ getValue }: ValueOf<When>) => <Time value={getValue()} format={formatDate} />;

/** A column of moments ("3 Dec 2026, 14:00"). */
export const dateTimeCell = ({ getValue }: ValueOf<When>) => <Time value={getValue()} />;

/** A column of short text kept on one line (names, periods). */
export const nowrapCell = ({ getValue }: ValueOf<ReactNode>) => <span className="whitespace-nowrap">{getValue()}</span>;

/** A column of figures (volumes, gravities, money), aligned right. */
export const figureMeta = { className: 'text-right' };
