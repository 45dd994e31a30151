import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { roleLabels, roles as roleOrder } from '../../../../shared/permissions/roles.ts';
import type { User, UserRolesInput } from '../../../../shared/schemas/user.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { useNotice } from '@/components/ui/notice';
import { useUpdateUser, userRolesSchema } from '@/features/users/api/update-user';
import { RoleCheckboxes } from '@/features/users/components/role-checkboxes';
import { applyProblemToForm } from '@/utils/problem-form';

export interface EditRolesDialogProps {
  user: User | null;
  /** The admin doing the editing: they cannot take away their own admin role here. */
  currentUserId: string;
  onClose: () => void;
}

interface EditRolesFormProps {
  user: User;
  isSelf: boolean;
  onClose: () => void;
  onBusy: (busy: boolean) => void;
}

const EditRolesForm = ({ user, isSelf, onClose, onBusy }: EditRolesFormProps) => {
  const update = useUpdateUser();
  const notice = useNotice();
  const [formError, setFormError] = useState<string | null>(null);
  useEffect(() => onBusy(update.isPending), [update.isPending, onBusy]);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isDirty },
  } = useForm<UserRolesInput>({
    resolver: zodResolver(userRolesSchema),
    defaultValues: { roles: roleOrder.filter((role) => user.roles.includes(role)) },
  });

  const onSubmit = handleSubmit(({ roles }) => {
    setFormError(null);
    // A disabled checkbox is left out of the form's values: keep your own admin role.
    const next = isSelf && user.roles.includes('admin') && !roles.includes('admin') ? [...roles, 'admin' as const] : roles;
    update.mutate(
      { id: user.id, roles: next },
      {
        onSuccess: () => {
          notice.show({ title: 'Roles saved', text: `${user.name} is now ${next.map((role) => roleLabels[role]).join(', ') || 'without a role'}.` });
          onClose();
        },
        onError: (error) => {
          const rest = applyProblemToForm(error, setError, ['roles']);
          if (rest.length) setFormError(rest.join(' '));
        },
      },
    );
  });

  const lockedAdmin = isSelf && user.roles.includes('admin');
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <RoleCheckboxes
        registration={register('roles')}
        error={errors.roles?.message ?? errors.roles?.root?.message}
        locked={lockedAdmin ? ['admin'] : []}
        lockedHint="Your own admin role: another admin has to remove it, so the co-op is never left without one."
      />
      <DialogActions>
        <Button variant="secondary" onClick={onClose} disabled={update.isPending}>
          Cancel
        </Button>
        <Button type="submit" pending={update.isPending} disabled={!isDirty}>
          Save roles
        </Button>
      </DialogActions>
    </form>
  );
};

export const EditRolesDialog = ({ user, currentUserId, onClose }: EditRolesDialogProps) => {
  const [busy, setBusy] = useState(false);
  return (
    <Dialog open={user !== null} onClose={onClose} busy={busy} title={user ? `Roles of ${user.name}` : 'Roles'} description={user?.email}>
      {user ? <EditRolesForm user={user} isSelf={user.id === currentUserId} onClose={onClose} onBusy={setBusy} /> : null}
    </Dialog>
  );
};
