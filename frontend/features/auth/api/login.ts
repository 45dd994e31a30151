import type { LoginInput, SessionUser } from '../../../../shared/schemas/auth.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { applySignedIn } from '@/lib/auth';

export { loginSchema } from '../../../../shared/schemas/auth.ts';

export const login = (input: LoginInput) => api.post<{ user: SessionUser }>('/api/auth/login', input);

export const useLogin = () => useApiMutation(login, [], ({ user }, queryClient) => applySignedIn(queryClient, user));
