import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { InviteUserInput, User } from '../../../../shared/schemas/user.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { inviteUserSchema, useInviteUser } from '@/features/users/api/invite-user';
import { RoleCheckboxes } from '@/features/users/components/role-checkboxes';
import { isApiProblem } from '@/lib/api-client';
import { applyProblemToForm } from '@/utils/problem-form';

export interface InviteUserDialogProps {
  open: boolean;
  onClose: () => void;
  onInvited: (user: User) => void;
}

type InviteUserFormProps = Omit<InviteUserDialogProps, 'open'> & { onBusy: (busy: boolean) => void };

const InviteUserForm = ({ onClose, onInvited, onBusy }: InviteUserFormProps) => {
  const invite = useInviteUser();
  useEffect(() => onBusy(invite.isPending), [invite.isPending, onBusy]);
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<InviteUserInput>({
    resolver: zodResolver(inviteUserSchema),
    defaultValues: { email: '', name: '', roles: ['member'] },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    invite.mutate(values, {
      onSuccess: ({ user }) => onInvited(user),
      onError: (error) => {
        // 409: the address already has an account; that belongs next to the e-mail box.
        if (isApiProblem(error) && error.status === 409 && error.errors.length === 0) {
          return setError('email', { type: 'server', message: error.detail ?? error.title }, { shouldFocus: true });
        }
        const rest = applyProblemToForm(error, setError, ['email', 'name', 'roles']);
        if (rest.length) setFormError(rest.join(' '));
      },
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <Field label="E-mail" error={errors.email?.message}>
        {({ invalid, ...control }) => (
          <Input
            {...control}
            invalid={invalid}
            type="email"
            inputMode="email"
            autoCapitalize="none"
            spellCheck={false}
            autoComplete="off"
            autoFocus
            {...register('email')}
          />
        )}
      </Field>
      <Field label="Name" hint="They can change it when they accept." error={errors.name?.message}>
        {({ invalid, ...control }) => <Input {...control} invalid={invalid} autoComplete="off" {...register('name')} />}
      </Field>
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
