import { useState } from 'react';
import { Link } from 'react-router-dom';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { resetPasswordFormSchema, useConfirmPasswordReset, type ResetPasswordFormValues } from '@/features/auth/api/confirm-password-reset';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { isApiProblem } from '@/lib/api-client';
import { fieldOfPath } from '@/utils/problem-form';

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
  const [deadLink, setDeadLink] = useState(false);
  const { form, message, showProblem, submit } = useApiForm<ResetPasswordFormValues>(resetPasswordFormSchema, {
    defaultValues: { password: '', confirmPassword: '' },
    fields: ['password'],
  });

  const onSubmit = submit(({ password }) => {
    confirm.mutate({ token, password }, { onError: (error) => (isDeadLink(error) ? setDeadLink(true) : showProblem(error)) });
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
    <FormFrame onSubmit={onSubmit} message={message} pending={confirm.isPending} submitLabel="Save the new password" submitClassName="w-full" actions="start">
      <NewPasswordFields form={form} />
    </FormFrame>
  );
};
