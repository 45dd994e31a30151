import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import type { User, UserListQuery } from '../../../../shared/schemas/user.ts';
import { api } from '@/lib/api-client';

export const userKeys = {
  all: ['users'] as const,
  list: (query: UserListQuery) => [...userKeys.all, 'list', query] as const,
};

export const getUsers = (query: UserListQuery, signal?: AbortSignal) =>
  api.get<Page<User>>('/api/users', { query: { ...query }, ...(signal ? { signal } : {}) });

export const getUsersQueryOptions = (query: UserListQuery) =>
  queryOptions({
    queryKey: userKeys.list(query),
    queryFn: ({ signal }) => getUsers(query, signal),
    placeholderData: keepPreviousData,
  });

export function useUsers(query: UserListQuery) {
  return useQuery(getUsersQueryOptions(query));
}
