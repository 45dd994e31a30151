import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { LoginInput, SessionUser } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { applySignedIn } from '@/lib/auth';

export { loginSchema } from '../../../../shared/schemas/auth.ts';

export const login = (input: LoginInput) => api.post<{ user: SessionUser }>('/api/auth/login', input);

export function useLogin() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: login,
    onSuccess: ({ user }) => applySignedIn(queryClient, user),
  });
}
