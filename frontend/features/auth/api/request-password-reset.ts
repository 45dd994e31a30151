import type { PasswordResetRequestInput } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export { passwordResetRequestSchema } from '../../../../shared/schemas/auth.ts';

/** Always 202, whether or not the address has an account. */
export const requestPasswordReset = (input: PasswordResetRequestInput) => api.post<void>('/api/auth/password-reset', input);

export const useRequestPasswordReset = () => useApiMutation(requestPasswordReset);
