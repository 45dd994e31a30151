import { useCallback, useMemo } from 'react';
import { invoiceListQuerySchema, type InvoiceListQuery } from '../../../../shared/schemas/billing.ts';
import { defaultPageSize } from '../../../../shared/schemas/pagination.ts';
import { useSearchParamsState } from '@/hooks/use-search-params-state';

const defaults = invoiceListQuerySchema.parse({ sort: 'createdAt', order: 'desc' });

/** The invoice list's state in the URL, parsed with the schema the server uses; bad values fall back to defaults. */
export function parseInvoiceListQuery(params: URLSearchParams): InvoiceListQuery {
  const raw: Record<string, string> = { sort: defaults.sort, order: defaults.order, ...Object.fromEntries(params) };
  const first = invoiceListQuerySchema.safeParse(raw);
  if (first.success) return first.data;
  for (const issue of first.error.issues) {
    const key = issue.path[0];
    if (typeof key === 'string') delete raw[key];
  }
  const second = invoiceListQuerySchema.safeParse({ sort: defaults.sort, order: defaults.order, ...raw });
  return second.success ? second.data : defaults;
}

export function invoiceListQueryToParams(query: InvoiceListQuery): URLSearchParams {
  const params = new URLSearchParams();
  if (query.q) params.set('q', query.q);
  if (query.period) params.set('period', query.period);
  if (query.status) params.set('status', query.status);
  if (query.memberId) params.set('memberId', query.memberId);
  if (query.unpaid !== undefined) params.set('unpaid', String(query.unpaid));
  if (query.sort !== defaults.sort) params.set('sort', query.sort);
  if (query.order !== defaults.order) params.set('order', query.order);
  if (query.page !== 1) params.set('page', String(query.page));
  if (query.pageSize !== defaultPageSize) params.set('pageSize', String(query.pageSize));
  return params;
}

export type InvoiceListQueryPatch = { [K in keyof InvoiceListQuery]?: InvoiceListQuery[K] | undefined };

export function useInvoicesSearchParams() {
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const query = useMemo(() => parseInvoiceListQuery(searchParams), [searchParams]);
  /** Any change but paging goes back to page 1. */
  const setQuery = useCallback(
    (patch: InvoiceListQueryPatch, options: { replace?: boolean } = {}) => {
      updateSearchParams(
        (previous) => {
          const current = parseInvoiceListQuery(previous);
          const next = { ...current, ...patch, page: patch.page ?? 1 };
          if (patch.pageSize === undefined) next.pageSize = current.pageSize;
          if ('sort' in patch && patch.sort === undefined) next.sort = defaults.sort;
          if ('order' in patch && patch.order === undefined) next.order = defaults.order;
          return invoiceListQueryToParams(next);
        },
        { replace: options.replace ?? false },
      );
    },
    [updateSearchParams],
  );
  const hasFilters = Boolean(query.q || query.period || query.status || query.memberId || query.unpaid !== undefined);
  return { query, setQuery, defaults, hasFilters };
}
