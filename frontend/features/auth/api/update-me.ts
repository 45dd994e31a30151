import type { SessionUser, UpdateMeInput } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { authKeys } from '@/lib/auth';

export { updateMeSchema } from '../../../../shared/schemas/auth.ts';

export const updateMe = (input: UpdateMeInput) => api.patch<{ user: SessionUser }>('/api/auth/me', input);

export const useUpdateMe = () => useApiMutation(updateMe, [], ({ user }, queryClient) => queryClient.setQueryData(authKeys.me, user));
