import { useEffect, useState } from 'react';
import type { InviteUserInput, User } from '../../../../shared/schemas/user.ts';
import { useApiForm } from '@/components/form/use-api-form';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { EmailField, FormMessageAlert, InputField } from '@/components/ui/field';
import { inviteUserSchema, useInviteUser } from '@/features/users/api/invite-user';
import { RoleCheckboxes } from '@/features/users/components/role-checkboxes';
import { isApiProblem } from '@/lib/api-client';

export interface InviteUserDialogProps {
  open: boolean;
  onClose: () => void;
  onInvited: (user: User) => void;
}

type InviteUserFormProps = Omit<InviteUserDialogProps, 'open'> & { onBusy: (busy: boolean) => void };

const InviteUserForm = ({ onClose, onInvited, onBusy }: InviteUserFormProps) => {
  const invite = useInviteUser();
  useEffect(() => onBusy(invite.isPending), [invite.isPending, onBusy]);
  const { form, message, showProblem, submit } = useApiForm<InviteUserInput>(inviteUserSchema, {
    defaultValues: { email: '', name: '', roles: ['member'] },
    fields: ['email', 'name', 'roles'],
  });
  const {
    register,
    setError,
    formState: { errors },
  } = form;

  const onSubmit = submit((values) => {
    invite.mutate(values, {
      onSuccess: ({ user }) => onInvited(user),
      onError: (error) => {
        // 409: the address already has an account; that belongs next to the e-mail box.
        if (isApiProblem(error) && error.status === 409 && error.errors.length === 0) {
          return setError('email', { type: 'server', message: error.detail ?? error.title }, { shouldFocus: true });
        }
        showProblem(error);
      },
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <FormMessageAlert message={message} />
      <EmailField error={errors.email?.message} autoComplete="off" autoFocus {...register('email')} />
      <InputField label="Name" hint="They can change it when they accept." error={errors.name?.message} autoComplete="off" {...register('name')} />
      <RoleCheckboxes registration={register('roles')} error={errors.roles?.message ?? errors.roles?.root?.message} />
      <DialogActions>
        <Button variant="secondary" onClick={onClose} disabled={invite.isPending}>
          Cancel
        </Button>
        <Button type="submit" pending={invite.isPending}>
          Send the invitation
        </Button>
      </DialogActions>
    </form>
  );
};

export const InviteUserDialog = ({ open, onClose, onInvited }: InviteUserDialogProps) => {
  const [busy, setBusy] = useState(false);
  return (
    <Dialog
      open={open}
      onClose={onClose}
      busy={busy}
      title="Invite someone"
      description="They get an e-mail with a link to choose a password. The link works once."
    >
      <InviteUserForm onClose={onClose} onInvited={onInvited} onBusy={setBusy} />
    </Dialog>
  );
};
