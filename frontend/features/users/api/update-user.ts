import type { UpdateUserInput, User } from '../../../../shared/schemas/user.ts';
import { userKeys } from '@/features/users/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { authKeys } from '@/lib/auth';

export { updateUserSchema, userRolesSchema } from '../../../../shared/schemas/user.ts';

export const updateUser = ({ id, ...input }: UpdateUserInput & { id: string }) => api.patch<{ user: User }>(`/api/users/${encodeURIComponent(id)}`, input);

export const useUpdateUser = () =>
  useApiMutation(updateUser, ({ user }, queryClient) =>
    // Changing your own roles changes what you may see.
    queryClient.getQueryData<{ id: string }>(authKeys.me)?.id === user.id ? [userKeys.all, authKeys.me] : [userKeys.all],
  );
