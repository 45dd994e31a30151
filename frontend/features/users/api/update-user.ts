import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UpdateUserInput, User } from '../../../../shared/schemas/user.ts';
import { userKeys } from '@/features/users/api/keys';
import { api } from '@/lib/api-client';
import { authKeys } from '@/lib/auth';

export { updateUserSchema, userRolesSchema } from '../../../../shared/schemas/user.ts';

export const updateUser = ({ id, ...input }: UpdateUserInput & { id: string }) => api.patch<{ user: User }>(`/api/users/${encodeURIComponent(id)}`, input);

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updateUser,
    onSuccess: async ({ user }) => {
      const me = queryClient.getQueryData<{ id: string }>(authKeys.me);
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: userKeys.all }),
        // Changing your own roles changes what you may see.
        me?.id === user.id ? queryClient.invalidateQueries({ queryKey: authKeys.me }) : Promise.resolve(),
      ]);
    },
  });
}
