import { z } from 'zod';
import type { PasswordResetConfirmInput } from '../../../../shared/schemas/auth.ts';
import { newPasswordFields, passwordsMatch, passwordsMatchIssue } from '@/features/auth/api/new-password';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export const resetPasswordFormSchema = z.object(newPasswordFields).refine(passwordsMatch, passwordsMatchIssue);
export type ResetPasswordFormValues = z.infer<typeof resetPasswordFormSchema>;

/** 204; 422 or 410 when the token is bad, expired or used. */
export const confirmPasswordReset = (input: PasswordResetConfirmInput) => api.post<void>('/api/auth/password-reset/confirm', input);

export const useConfirmPasswordReset = () => useApiMutation(confirmPasswordReset);
