import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import type { ReactNode } from 'react';
import type { SessionUser } from '../../../../shared/schemas/auth.ts';
import { authKeys } from '@/lib/auth';

/** Renders inside a fresh query client, signed in as someone who prefers `units`. */
export function renderSignedIn(ui: ReactNode, units: SessionUser['units'] = 'metric') {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: Infinity }, mutations: { retry: false } } });
  queryClient.setQueryData(authKeys.me, {
    id: '00000000-0000-4000-8000-000000000001',
    name: 'Tester',
    email: 't@example.test',
    roles: [],
    units,
  });
  return render(<QueryClientProvider client={queryClient}>{ui}</QueryClientProvider>);
}

/** A JSON or problem answer for a stubbed `fetch`. */
export const answer = (status: number, body: unknown) =>
  new Response(JSON.stringify(body), { status, headers: { 'Content-Type': status >= 400 ? 'application/problem+json' : 'application/json' } });
