import type { Invitation } from '../../../../shared/schemas/auth.ts';
import { useApiForm } from '@/components/form/use-api-form';
import { Button } from '@/components/ui/button';
import { FormMessageAlert, InputField } from '@/components/ui/field';
import { acceptInvitationFormSchema, useAcceptInvitation, type AcceptInvitationFormValues } from '@/features/auth/api/accept-invitation';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { isApiProblem } from '@/lib/api-client';

export interface AcceptInvitationFormProps {
  token: string;
  invitation: Invitation;
  onAccepted: () => void;
}

export const AcceptInvitationForm = ({ token, invitation, onAccepted }: AcceptInvitationFormProps) => {
  const accept = useAcceptInvitation();
  const { form, message, showError, showProblem, submit } = useApiForm<AcceptInvitationFormValues>(acceptInvitationFormSchema, {
    defaultValues: { name: invitation.name, password: '', confirmPassword: '' },
    fields: ['name', 'password'],
  });
  const {
    register,
    formState: { errors },
  } = form;

  const onSubmit = submit(({ name, password }) => {
    accept.mutate(
      { token, name, password },
      {
        onSuccess: onAccepted,
        onError: (error) => {
          if (isApiProblem(error) && (error.status === 410 || error.status === 404)) {
            return showError('This invitation has expired or was used already. Ask the co-op admin for a new one.');
          }
          showProblem(error);
        },
      },
    );
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <FormMessageAlert message={message} />
      <InputField label="E-mail" hint="You'll sign in with this address." type="email" value={invitation.email} readOnly autoComplete="username" />
      <InputField label="Your name" hint="As the rest of the co-op will see it." error={errors.name?.message} autoComplete="name" {...register('name')} />
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
