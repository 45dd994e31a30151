import { useMutation, useQueryClient, type QueryClient, type QueryKey } from '@tanstack/react-query';

/** The queries a change makes stale: fixed keys, or keys chosen from the answer. */
export type StaleKeys<TData> = readonly QueryKey[] | ((data: TData, queryClient: QueryClient) => readonly QueryKey[]);

/**
 * A change sent to the API. On success `onSuccess` first writes what the answer already holds into the
 * cache, then every query under `stale` is refetched; the mutation settles once they have been.
 */
export function useApiMutation<TData, TVariables = void>(
  mutationFn: (variables: TVariables) => Promise<TData>,
  stale: StaleKeys<TData> = [],
  onSuccess?: (data: TData, queryClient: QueryClient) => void,
) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn,
    onSuccess: async (data: TData) => {
      onSuccess?.(data, queryClient);
      const keys = typeof stale === 'function' ? stale(data, queryClient) : stale;
      await Promise.all(keys.map((queryKey) => queryClient.invalidateQueries({ queryKey })));
    },
  });
}
