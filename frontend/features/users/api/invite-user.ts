import type { InviteUserInput, User } from '../../../../shared/schemas/user.ts';
import { userKeys } from '@/features/users/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { mailboxKeys } from '@/features/mailbox/api/keys';

export { inviteUserSchema } from '../../../../shared/schemas/user.ts';

/** 201 with the new (not yet active) person; the server e-mails them an invitation link. */
export const inviteUser = (input: InviteUserInput) => api.post<{ user: User }>('/api/users/invitations', input);

export const useInviteUser = () => useApiMutation(inviteUser, [userKeys.all, mailboxKeys.all]);
