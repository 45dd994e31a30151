import { useState } from 'react';
import type { PasswordResetRequestInput } from '../../../../shared/schemas/auth.ts';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { EmailField, FormMessageAlert } from '@/components/ui/field';
import { passwordResetRequestSchema, useRequestPasswordReset } from '@/features/auth/api/request-password-reset';
import { isApiProblem } from '@/lib/api-client';

export const ForgotPasswordForm = () => {
  const request = useRequestPasswordReset();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { form, message, showError, showProblem, submit } = useApiForm<PasswordResetRequestInput>(passwordResetRequestSchema, {
    defaultValues: { email: '' },
    fields: ['email'],
  });
  const {
    register,
    formState: { errors },
  } = form;

  const onSubmit = submit((values) => {
    request.mutate(values, {
      onSuccess: () => setSentTo(values.email),
      onError: (error) => {
        if (isApiProblem(error) && error.status === 429) {
          return showError('Too many requests. Wait a few minutes, then try again.');
        }
        showProblem(error);
      },
    });
  });

  if (sentTo) {
    return (
      <Alert tone="success" title="Check your e-mail">
        If <strong className="font-semibold">{sentTo}</strong> has an account here, a link to choose a new password is on its way. It works once and only for a
        short while.
      </Alert>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <FormMessageAlert message={message} />
      <EmailField error={errors.email?.message} autoComplete="email" autoFocus {...register('email')} />
      <Button type="submit" pending={request.isPending} className="w-full">
        Send the link
      </Button>
    </form>
  );
};
