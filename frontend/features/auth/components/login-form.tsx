import { Link } from 'react-router-dom';
import type { LoginInput } from '../../../../shared/schemas/auth.ts';
import { TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { paths } from '@/config/paths';
import { loginSchema, useLogin } from '@/features/auth/api/login';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { pluralize } from '@/utils/format';

export interface LoginFormProps {
  onSignedIn: () => void;
}

function loginErrorMessage(error: unknown): string | null {
  if (!isApiProblem(error)) return problemMessage(error);
  if (error.status === 401) return 'E-mail or password is wrong.';
  if (error.status === 429) {
    const locked = error.title === 'Account locked';
    const first = locked
      ? 'Sign-in to this account is locked after many failed attempts. Its owner has been e-mailed a link to unlock it'
      : 'Too many attempts';
    if (error.retryAfterSeconds === undefined) return `${first}. Try again in a while.`;
    const minutes = Math.max(1, Math.ceil(error.retryAfterSeconds / 60));
    return `${first}${locked ? '; or' : ','} try again in ${pluralize(minutes, 'minute')}.`;
  }
  if (error.status === 422) return null; // shown beside the fields
  return problemMessage(error);
}

export const LoginForm = ({ onSignedIn }: LoginFormProps) => {
  const login = useLogin();
  const { form, message, showError, showProblem, submit } = useApiForm<LoginInput>(loginSchema, {
    defaultValues: { email: '', password: '' },
    fields: ['email', 'password'],
  });
  const onSubmit = submit((values) => {
    login.mutate(values, {
      onSuccess: onSignedIn,
      onError: (error) => {
        const message = loginErrorMessage(error);
        if (message) return showError(message);
        showProblem(error);
      },
    });
  });

  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={login.isPending} submitLabel="Sign in" submitClassName="mt-1 w-full" actions="start">
      <TextField form={form} name="email" kind="email" label="E-mail" autoComplete="username" autoFocus />
      <TextField
        form={form}
        name="password"
        kind="password"
        label="Password"
        autoComplete="current-password"
        aside={
          <Link to={paths.forgotPassword} className="text-sm">
            Forgot password?
          </Link>
        }
      />
    </FormFrame>
  );
};
