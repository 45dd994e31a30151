import { useState } from 'react';
import type { PasswordResetRequestInput } from '../../../../shared/schemas/auth.ts';
import { TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { passwordResetRequestSchema, useRequestPasswordReset } from '@/features/auth/api/request-password-reset';
import { isApiProblem } from '@/lib/api-client';

export const ForgotPasswordForm = () => {
  const request = useRequestPasswordReset();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { form, message, showError, showProblem, submit } = useApiForm<PasswordResetRequestInput>(passwordResetRequestSchema, {
    defaultValues: { email: '' },
    fields: ['email'],
  });
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
    <FormFrame onSubmit={onSubmit} message={message} pending={request.isPending} submitLabel="Send the link" submitClassName="w-full" actions="start">
      <TextField form={form} name="email" kind="email" label="E-mail" autoComplete="email" autoFocus />
    </FormFrame>
  );
};
