import { useCallback, useMemo } from 'react';
import { equipmentListQuerySchema, type EquipmentListQuery } from '../../../../shared/schemas/equipment.ts';
import { defaultPageSize } from '../../../../shared/schemas/pagination.ts';
import { useSearchParamsState } from '@/hooks/use-search-params-state';

const defaults = equipmentListQuerySchema.parse({});

/** The Cellar list's state lives in the URL, parsed with the server's own schema; bad values fall back. */
export function parseEquipmentListQuery(params: URLSearchParams): EquipmentListQuery {
  const raw: Record<string, string> = Object.fromEntries(params);
  const first = equipmentListQuerySchema.safeParse(raw);
  if (first.success) return first.data;
  for (const issue of first.error.issues) {
    const key = issue.path[0];
    if (typeof key === 'string') delete raw[key];
  }
  const second = equipmentListQuerySchema.safeParse(raw);
  return second.success ? second.data : defaults;
}

export function equipmentListQueryToParams(query: EquipmentListQuery): URLSearchParams {
  const params = new URLSearchParams();
  if (query.q) params.set('q', query.q);
  if (query.kind) params.set('kind', query.kind);
  if (query.state) params.set('state', query.state);
  if (query.sort !== defaults.sort) params.set('sort', query.sort);
  if (query.order !== defaults.order) params.set('order', query.order);
  if (query.page !== 1) params.set('page', String(query.page));
  if (query.pageSize !== defaultPageSize) params.set('pageSize', String(query.pageSize));
  return params;
}

export type EquipmentListQueryPatch = { [K in keyof EquipmentListQuery]?: EquipmentListQuery[K] | undefined };

export function useEquipmentSearchParams() {
  // Updates start from the URL as it is now, so two quick filter changes never undo each other.
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const query = useMemo(() => parseEquipmentListQuery(searchParams), [searchParams]);
  /** Merge a change in; anything but paging goes back to page 1. */
  const setQuery = useCallback(
    (patch: EquipmentListQueryPatch, options: { replace?: boolean } = {}) => {
      updateSearchParams(
        (previous) => {
          const current = parseEquipmentListQuery(previous);
          const next = { ...current, ...patch, page: patch.page ?? 1 };
          if (patch.pageSize === undefined) next.pageSize = current.pageSize;
          return equipmentListQueryToParams(next);
        },
        { replace: options.replace ?? false },
      );
    },
    [updateSearchParams],
  );
  return { query, setQuery };
}
