import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Invitation } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';

export const invitationKeys = {
  all: ['invitation'] as const,
  detail: (token: string) => [...invitationKeys.all, token] as const,
};

/** 404 unknown, 410 expired or already used. */
export const getInvitation = (token: string, signal?: AbortSignal) =>
  api.get<Invitation>(`/api/auth/invitations/${encodeURIComponent(token)}`, signal ? { signal } : {});

export const getInvitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: invitationKeys.detail(token),
    queryFn: ({ signal }) => getInvitation(token, signal),
    staleTime: Number.POSITIVE_INFINITY,
    retry: false,
  });

export function useInvitation(token: string) {
  return useQuery({ ...getInvitationQueryOptions(token), enabled: token.length > 0 });
}
