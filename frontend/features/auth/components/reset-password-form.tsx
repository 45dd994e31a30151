import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { Button, buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { resetPasswordFormSchema, useConfirmPasswordReset, type ResetPasswordFormValues } from '@/features/auth/api/confirm-password-reset';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { isApiProblem } from '@/lib/api-client';
import { applyProblemToForm, fieldOfPath } from '@/utils/problem-form';

export interface ResetPasswordFormProps {
  token: string;
}

/** A dead link (expired, used, unknown): 410, or 422 that blames the token rather than the password. */
function isDeadLink(error: unknown): boolean {
  if (!isApiProblem(error)) return false;
  if (error.status === 410 || error.status === 404) return true;
  if (error.status !== 422) return false;
  return error.errors.length === 0 || error.errors.some((item) => fieldOfPath(item.path) === 'token');
}

export const ResetPasswordForm = ({ token }: ResetPasswordFormProps) => {
  const confirm = useConfirmPasswordReset();
  const [formError, setFormError] = useState<string | null>(null);
  const [deadLink, setDeadLink] = useState(false);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<ResetPasswordFormValues>({
    resolver: zodResolver(resetPasswordFormSchema),
    defaultValues: { password: '', confirmPassword: '' },
  });

  const onSubmit = handleSubmit(({ password }) => {
    setFormError(null);
    confirm.mutate(
      { token, password },
      {
        onError: (error) => {
          if (isDeadLink(error)) return setDeadLink(true);
          const rest = applyProblemToForm(error, setError, ['password']);
          if (rest.length) setFormError(rest.join(' '));
        },
      },
    );
  });

  if (confirm.isSuccess) {
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="success" title="Password changed">
          Sign in with your new password.
        </Alert>
        <Link to={paths.login} className={buttonClasses('primary', 'md', 'w-full')}>
          Sign in
        </Link>
      </div>
    );
  }

  if (deadLink) {
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="error" title="This link no longer works">
          It has expired or has been used already. Ask for a new one; it comes by e-mail in a minute.
        </Alert>
        <Link to={paths.forgotPassword} className={buttonClasses('primary', 'md', 'w-full')}>
          Send me a new link
        </Link>
      </div>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <NewPasswordFields
        password={register('password')}
        confirmPassword={register('confirmPassword')}
        passwordError={errors.password?.message}
        confirmPasswordError={errors.confirmPassword?.message}
      />
      <Button type="submit" pending={confirm.isPending} className="w-full">
        Save the new password
      </Button>
    </form>
  );
};
