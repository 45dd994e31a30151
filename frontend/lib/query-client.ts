import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { isApiProblem, networkProblemStatus } from '@/lib/api-client';
import { authKeys } from '@/lib/auth';

/** Any 401 means the session is gone: forget the user, and the app frame sends them to sign in. */
function onAuthError(error: unknown): void {
  if (isApiProblem(error) && error.status === 401 && queryClient.getQueryData(authKeys.me)) {
    queryClient.setQueryData(authKeys.me, null);
  }
}

export const queryClient: QueryClient = new QueryClient({
  queryCache: new QueryCache({ onError: onAuthError }),
  mutationCache: new MutationCache({ onError: onAuthError }),
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      refetchOnWindowFocus: false,
      // 4xx answers won't change by asking again; network trouble and 5xx might.
      retry: (failureCount, error) => {
        if (isApiProblem(error) && error.status !== networkProblemStatus && error.status < 500) return false;
        return failureCount < 2;
      },
    },
    mutations: { retry: false },
  },
});
