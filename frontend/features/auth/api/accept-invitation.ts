import { z } from 'zod';
import { type AcceptInvitationInput, type SessionUser } from '../../../../shared/schemas/auth.ts';
import { personNameSchema } from '../../../../shared/schemas/user.ts';
import { newPasswordFields, passwordsMatch, passwordsMatchIssue } from '@/features/auth/api/new-password';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { applySignedIn } from '@/lib/auth';

export const acceptInvitationFormSchema = z.object({ name: personNameSchema, ...newPasswordFields }).refine(passwordsMatch, passwordsMatchIssue);
export type AcceptInvitationFormValues = z.infer<typeof acceptInvitationFormSchema>;

/** Sets the name and password, and signs the new person in. */
export const acceptInvitation = (input: AcceptInvitationInput) => api.post<{ user: SessionUser }>('/api/auth/invitations/accept', input);

export const useAcceptInvitation = () => useApiMutation(acceptInvitation, [], ({ user }, queryClient) => applySignedIn(queryClient, user));
