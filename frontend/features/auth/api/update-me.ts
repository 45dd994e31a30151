import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SessionUser, UpdateMeInput } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { authKeys } from '@/lib/auth';

export { updateMeSchema } from '../../../../shared/schemas/auth.ts';

export const updateMe = (input: UpdateMeInput) => api.patch<{ user: SessionUser }>('/api/auth/me', input);

export function useUpdateMe() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updateMe,
    onSuccess: ({ user }) => queryClient.setQueryData(authKeys.me, user),
  });
}
