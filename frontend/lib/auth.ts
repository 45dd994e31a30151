import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type { SessionUser } from '../../shared/schemas/auth.ts';
import { api, isApiProblem, resetCsrfToken } from '@/lib/api-client';
import { setCoopTimeZone } from '@/utils/format';

/**
 * The session as the client sees it: `['auth', 'me']` holds the signed-in person, or `null` when
 * nobody is signed in. Everything that needs "who am I" reads this one query.
 */
export const authKeys = {
  all: ['auth'] as const,
  me: ['auth', 'me'] as const,
};

export async function getMe(signal?: AbortSignal): Promise<SessionUser | null> {
  try {
    const { user, coop } = await api.get<{ user: SessionUser; coop?: { timeZone?: string } }>('/api/auth/me', signal ? { signal } : {});
    setCoopTimeZone(coop?.timeZone);
    return user;
  } catch (error) {
    if (isApiProblem(error) && error.status === 401) return null;
    throw error;
  }
}

export const getMeQueryOptions = () =>
  queryOptions({
    queryKey: authKeys.me,
    // No abort signal on purpose: route loaders await this same fetch, and a component unmounting
    // (StrictMode does it on every mount) must not cancel it under them.
    queryFn: () => getMe(),
    staleTime: 5 * 60_000,
  });

export function useSession() {
  return useQuery(getMeQueryOptions());
}

/** The signed-in person, or null. Inside the app frame it is always set. */
export function useSessionUser(): SessionUser | null {
  return useSession().data ?? null;
}

/** After sign-in (or accepting an invitation): a new session, a new CSRF token, no one else's cache. */
export function applySignedIn(queryClient: QueryClient, user: SessionUser): void {
  resetCsrfToken();
  queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== authKeys.all[0] });
  queryClient.setQueryData(authKeys.me, user);
}

/** After sign-out or an expired session. */
export function applySignedOut(queryClient: QueryClient): void {
  resetCsrfToken();
  queryClient.setQueryData(authKeys.me, null);
  // Drop everyone's data once the frame has unmounted and stopped observing it.
  setTimeout(() => queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== authKeys.all[0] }), 0);
}

export async function logout(): Promise<void> {
  await api.post<void>('/api/auth/logout');
}

export function useLogout() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: logout,
    onSettled: () => applySignedOut(queryClient),
  });
}

/** `next` from the URL, only if it is a path inside this app. */
export function safeNextPath(next: string | null | undefined): string | null {
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return null;
  if (next.startsWith('/login')) return null;
  return next;
}
