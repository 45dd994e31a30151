import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { PasswordResetRequestInput } from '../../../../shared/schemas/auth.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { passwordResetRequestSchema, useRequestPasswordReset } from '@/features/auth/api/request-password-reset';
import { isApiProblem } from '@/lib/api-client';
import { applyProblemToForm } from '@/utils/problem-form';

export const ForgotPasswordForm = () => {
  const request = useRequestPasswordReset();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<PasswordResetRequestInput>({
    resolver: zodResolver(passwordResetRequestSchema),
    defaultValues: { email: '' },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    request.mutate(values, {
      onSuccess: () => setSentTo(values.email),
      onError: (error) => {
        if (isApiProblem(error) && error.status === 429) {
          return setFormError('Too many requests. Wait a few minutes, then try again.');
        }
        const rest = applyProblemToForm(error, setError, ['email']);
        if (rest.length) setFormError(rest.join(' '));
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
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <Field label="E-mail" error={errors.email?.message}>
        {({ invalid, ...control }) => (
          <Input
            {...control}
            invalid={invalid}
            type="email"
            autoComplete="email"
            inputMode="email"
            autoCapitalize="none"
            spellCheck={false}
            autoFocus
            {...register('email')}
          />
        )}
      </Field>
      <Button type="submit" pending={request.isPending} className="w-full">
        Send the link
      </Button>
    </form>
  );
};
