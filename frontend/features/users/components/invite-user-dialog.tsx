import type { InviteUserInput, User } from '../../../../shared/schemas/user.ts';
import { TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { FormDialog } from '@/components/ui/form-dialog';
import { inviteUserSchema, useInviteUser } from '@/features/users/api/invite-user';
import { RoleCheckboxes } from '@/features/users/components/role-checkboxes';
import { isApiProblem } from '@/lib/api-client';

export interface InviteUserDialogProps {
  open: boolean;
  onClose: () => void;
  onInvited: (user: User) => void;
}

const InviteUserForm = ({ onClose, onInvited }: Omit<InviteUserDialogProps, 'open'>) => {
  const invite = useInviteUser();
  const { form, message, showProblem, submit } = useApiForm<InviteUserInput>(inviteUserSchema, {
    defaultValues: { email: '', name: '', roles: ['member'] },
    fields: ['email', 'name', 'roles'],
  });
  const onSubmit = submit((values) => {
    invite.mutate(values, {
      onSuccess: ({ user }) => onInvited(user),
      onError: (error) => {
        // 409: the address already has an account; that belongs next to the e-mail box.
        if (isApiProblem(error) && error.status === 409 && error.errors.length === 0) {
          return form.setError('email', { type: 'server', message: error.detail ?? error.title }, { shouldFocus: true });
        }
        showProblem(error);
      },
    });
  });

  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={invite.isPending} onCancel={onClose} submitLabel="Send the invitation">
      <TextField form={form} name="email" kind="email" label="E-mail" autoComplete="off" autoFocus />
      <TextField form={form} name="name" label="Name" hint="They can change it when they accept." autoComplete="off" />
      <RoleCheckboxes form={form} />
    </FormFrame>
  );
};

export const InviteUserDialog = ({ open, onClose, onInvited }: InviteUserDialogProps) => (
  <FormDialog open={open} onClose={onClose} title="Invite someone" description="They get an e-mail with a link to choose a password. The link works once.">
    <InviteUserForm onClose={onClose} onInvited={onInvited} />
  </FormDialog>
);
