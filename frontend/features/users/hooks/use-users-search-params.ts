import { useCallback, useMemo } from 'react';
import { defaultPageSize } from '../../../../shared/schemas/pagination.ts';
import { userListQuerySchema, type UserListQuery } from '../../../../shared/schemas/user.ts';
import { useSearchParamsState } from '@/hooks/use-search-params-state';

const defaults = userListQuerySchema.parse({});

/**
 * The member list's state lives in the URL (`?page&pageSize&sort&order&q&role&active`), parsed
 * with the same schema the server uses. A bad value in a hand-edited URL falls back to its default
 * instead of breaking the page.
 */
export function parseUserListQuery(params: URLSearchParams): UserListQuery {
  const raw: Record<string, string> = Object.fromEntries(params);
  const first = userListQuerySchema.safeParse(raw);
  if (first.success) return first.data;
  for (const issue of first.error.issues) {
    const key = issue.path[0];
    if (typeof key === 'string') delete raw[key];
  }
  const second = userListQuerySchema.safeParse(raw);
  return second.success ? second.data : defaults;
}

/** Only what differs from the defaults goes into the URL. */
export function userListQueryToParams(query: UserListQuery): URLSearchParams {
  const params = new URLSearchParams();
  if (query.q) params.set('q', query.q);
  if (query.role) params.set('role', query.role);
  if (query.active !== undefined) params.set('active', String(query.active));
  if (query.sort !== defaults.sort) params.set('sort', query.sort);
  if (query.order !== defaults.order) params.set('order', query.order);
  if (query.page !== 1) params.set('page', String(query.page));
  if (query.pageSize !== defaultPageSize) params.set('pageSize', String(query.pageSize));
  return params;
}

export type UserListQueryPatch = { [K in keyof UserListQuery]?: UserListQuery[K] | undefined };

export function useUsersSearchParams() {
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const query = useMemo(() => parseUserListQuery(searchParams), [searchParams]);

  /**
   * Merge a change in; anything but paging sends you back to page 1. Each change is a history entry
   * (Back undoes it) unless `replace` is set, as the search box does while you type.
   */
  const setQuery = useCallback(
    (patch: UserListQueryPatch, options: { replace?: boolean } = {}) => {
      updateSearchParams(
        (previous) => {
          const current = parseUserListQuery(previous);
          const next: UserListQuery = { ...current, ...patch, page: patch.page ?? 1 };
          if (patch.sort === undefined && 'sort' in patch) next.sort = defaults.sort;
          if (patch.order === undefined && 'order' in patch) next.order = defaults.order;
          if (patch.pageSize === undefined) next.pageSize = current.pageSize;
          return userListQueryToParams(next);
        },
        { replace: options.replace ?? false },
      );
    },
    [updateSearchParams],
  );

  return { query, setQuery, defaults };
}
