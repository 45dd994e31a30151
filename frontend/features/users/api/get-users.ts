import { useQuery } from '@tanstack/react-query';
import { userListQuerySchema, type User, type UserListQuery } from '../../../../shared/schemas/user.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { userKeys } from '@/features/users/api/keys';

/** The member list's state in the URL (`?page&pageSize&sort&order&q&role&active`). */
export const userListQuery = defineListQuery(userListQuerySchema);

export const getUsersQueryOptions = (query: UserListQuery) => pageQueryOptions<User>(userKeys.list(query), '/api/users', query);

export function useUsers(query: UserListQuery) {
  return useQuery(getUsersQueryOptions(query));
}
