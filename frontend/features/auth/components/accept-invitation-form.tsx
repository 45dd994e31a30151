import type { Invitation } from '../../../../shared/schemas/auth.ts';
import { TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { InputField } from '@/components/ui/field';
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
    <FormFrame onSubmit={onSubmit} message={message} pending={accept.isPending} submitLabel="Join and sign in" submitClassName="w-full" actions="start">
      <InputField label="E-mail" hint="You'll sign in with this address." type="email" value={invitation.email} readOnly autoComplete="username" />
      <TextField form={form} name="name" label="Your name" hint="As the rest of the co-op will see it." autoComplete="name" />
      <NewPasswordFields form={form} />
    </FormFrame>
  );
};
