import type { UnlockAccountInput } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

/** 204; 404 or 410 when the link is unknown, expired or used. */
export const unlockAccount = (input: UnlockAccountInput) => api.post<void>('/api/auth/unlock', input);

export const useUnlockAccount = () => useApiMutation(unlockAccount);
