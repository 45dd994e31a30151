// @vitest-environment happy-dom
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, renderHook, waitFor } from '@testing-library/react';
import type { ReactNode } from 'react';
import { describe, expect, it, vi } from 'vitest';
import { useApiMutation } from '@/lib/api-mutation';

const setup = () => {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  const wrapper = ({ children }: { children: ReactNode }) => <QueryClientProvider client={queryClient}>{children}</QueryClientProvider>;
  queryClient.setQueryData(['kegs', 'list'], ['old']);
  queryClient.setQueryData(['batches', 'list'], ['old']);
  return { queryClient, wrapper };
};

describe('useApiMutation', () => {
  it('writes the answer into the cache, then marks the stale keys for refetching', async () => {
    const { queryClient, wrapper } = setup();
    const { result } = renderHook(
      () =>
        useApiMutation(
          (name: string) => Promise.resolve({ keg: { id: 'k1', name } }),
          [['kegs']],
          ({ keg }, client) => client.setQueryData(['kegs', 'detail', keg.id], keg),
        ),
      { wrapper },
    );
    await act(() => result.current.mutateAsync('Amber'));
    expect(queryClient.getQueryData(['kegs', 'detail', 'k1'])).toEqual({ id: 'k1', name: 'Amber' });
    expect(queryClient.getQueryState(['kegs', 'list'])?.isInvalidated).toBe(true);
    expect(queryClient.getQueryState(['batches', 'list'])?.isInvalidated).toBe(false);
  });

  it('chooses the stale keys from the answer', async () => {
    const { queryClient, wrapper } = setup();
    const { result } = renderHook(
      () =>
        useApiMutation(
          () => Promise.resolve({ mine: true }),
          ({ mine }) => (mine ? [['batches']] : []),
        ),
      { wrapper },
    );
    await act(() => result.current.mutateAsync());
    expect(queryClient.getQueryState(['batches', 'list'])?.isInvalidated).toBe(true);
    expect(queryClient.getQueryState(['kegs', 'list'])?.isInvalidated).toBe(false);
  });

  it('changes nothing in the cache when the request fails', async () => {
    const { queryClient, wrapper } = setup();
    const written = vi.fn();
    const { result } = renderHook(() => useApiMutation(() => Promise.reject(new Error('refused')), [['kegs']], written), { wrapper });
    act(() => result.current.mutate());
    await waitFor(() => expect(result.current.isError).toBe(true));
    expect(written).not.toHaveBeenCalled();
    expect(queryClient.getQueryState(['kegs', 'list'])?.isInvalidated).toBe(false);
  });
});
