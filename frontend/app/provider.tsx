import { QueryClientProvider } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { AppAbilityProvider } from '@/lib/ability';
import { queryClient } from '@/lib/query-client';

export const AppProvider = ({ children }: { children: ReactNode }) => (
  <QueryClientProvider client={queryClient}>
    <AppAbilityProvider>{children}</AppAbilityProvider>
  </QueryClientProvider>
);
