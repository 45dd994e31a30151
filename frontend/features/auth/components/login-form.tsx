import { Link } from 'react-router-dom';
import type { LoginInput } from '../../../../shared/schemas/auth.ts';
import { useApiForm } from '@/components/form/use-api-form';
import { Button } from '@/components/ui/button';
import { EmailField, Field, FormMessageAlert } from '@/components/ui/field';
import { PasswordInput } from '@/components/ui/input';
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
  const {
    register,
    formState: { errors },
  } = form;

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
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <FormMessageAlert message={message} />
      <EmailField error={errors.email?.message} autoComplete="username" autoFocus {...register('email')} />
      <Field
        label="Password"
        error={errors.password?.message}
        aside={
          <Link to={paths.forgotPassword} className="text-sm">
            Forgot password?
          </Link>
        }
      >
        {({ invalid, ...control }) => <PasswordInput {...control} invalid={invalid} autoComplete="current-password" {...register('password')} />}
      </Field>
      <Button type="submit" pending={login.isPending} className="mt-1 w-full">
        Sign in
      </Button>
    </form>
  );
};
