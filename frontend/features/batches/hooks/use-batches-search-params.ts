import { useCallback, useMemo } from 'react';
import { batchListQuerySchema, type BatchListQuery } from '../../../../shared/schemas/batches.ts';
import { defaultPageSize } from '../../../../shared/schemas/pagination.ts';
import { useSearchParamsState } from '@/hooks/use-search-params-state';

const defaults = batchListQuerySchema.parse({ order: 'desc' });

/** The batches list's state in the URL, parsed with the server's own schema; bad values fall back to defaults. */
export function parseBatchListQuery(params: URLSearchParams): BatchListQuery {
  const raw: Record<string, string> = { order: defaults.order, ...Object.fromEntries(params) };
  const first = batchListQuerySchema.safeParse(raw);
  if (first.success) return first.data;
  for (const issue of first.error.issues) {
    const key = issue.path[0];
    if (typeof key === 'string') delete raw[key];
  }
  const second = batchListQuerySchema.safeParse(raw);
  return second.success ? second.data : defaults;
}

export function batchListQueryToParams(query: BatchListQuery): URLSearchParams {
  const params = new URLSearchParams();
  if (query.q) params.set('q', query.q);
  if (query.status) params.set('status', query.status);
  if (query.mine) params.set('mine', '1');
  if (query.sort !== defaults.sort) params.set('sort', query.sort);
  if (query.order !== defaults.order) params.set('order', query.order);
  if (query.page !== 1) params.set('page', String(query.page));
  if (query.pageSize !== defaultPageSize) params.set('pageSize', String(query.pageSize));
  return params;
}

export type BatchListQueryPatch = { [K in keyof BatchListQuery]?: BatchListQuery[K] | undefined };

export function useBatchesSearchParams() {
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const query = useMemo(() => parseBatchListQuery(searchParams), [searchParams]);
  const setQuery = useCallback(
    (patch: BatchListQueryPatch, options: { replace?: boolean } = {}) => {
      updateSearchParams(
        (previous) => {
          const current = parseBatchListQuery(previous);
          const next = { ...current, ...patch, page: patch.page ?? 1 };
          if (patch.pageSize === undefined) next.pageSize = current.pageSize;
          return batchListQueryToParams(next);
        },
        { replace: options.replace ?? false },
      );
    },
    [updateSearchParams],
  );
  return { query, setQuery, defaults };
}
