import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { Invitation } from '../../../../shared/schemas/auth.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { acceptInvitationFormSchema, useAcceptInvitation, type AcceptInvitationFormValues } from '@/features/auth/api/accept-invitation';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { isApiProblem } from '@/lib/api-client';
import { applyProblemToForm } from '@/utils/problem-form';

export interface AcceptInvitationFormProps {
  token: string;
  invitation: Invitation;
  onAccepted: () => void;
}

export const AcceptInvitationForm = ({ token, invitation, onAccepted }: AcceptInvitationFormProps) => {
  const accept = useAcceptInvitation();
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<AcceptInvitationFormValues>({
    resolver: zodResolver(acceptInvitationFormSchema),
    defaultValues: { name: invitation.name, password: '', confirmPassword: '' },
  });

  const onSubmit = handleSubmit(({ name, password }) => {
    setFormError(null);
    accept.mutate(
      { token, name, password },
      {
        onSuccess: onAccepted,
        onError: (error) => {
          if (isApiProblem(error) && (error.status === 410 || error.status === 404)) {
            return setFormError('This invitation has expired or was used already. Ask the co-op admin for a new one.');
          }
          const rest = applyProblemToForm(error, setError, ['name', 'password']);
          if (rest.length) setFormError(rest.join(' '));
        },
      },
    );
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <Field label="E-mail" hint="You'll sign in with this address.">
        {({ invalid, ...control }) => <Input {...control} invalid={invalid} type="email" value={invitation.email} readOnly autoComplete="username" />}
      </Field>
      <Field label="Your name" hint="As the rest of the co-op will see it." error={errors.name?.message}>
        {({ invalid, ...control }) => <Input {...control} invalid={invalid} autoComplete="name" {...register('name')} />}
      </Field>
      <NewPasswordFields
        password={register('password')}
        confirmPassword={register('confirmPassword')}
        passwordError={errors.password?.message}
        confirmPasswordError={errors.confirmPassword?.message}
      />
      <Button type="submit" pending={accept.isPending} className="w-full">
        Join and sign in
      </Button>
    </form>
  );
};
