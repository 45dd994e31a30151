import { roleLabels, roles as roleOrder } from '../../../../shared/permissions/roles.ts';
import type { User, UserRolesInput } from '../../../../shared/schemas/user.ts';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { FormDialog } from '@/components/ui/form-dialog';
import { useNotice } from '@/components/ui/notice';
import { useUpdateUser, userRolesSchema } from '@/features/users/api/update-user';
import { RoleCheckboxes } from '@/features/users/components/role-checkboxes';

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
}

const EditRolesForm = ({ user, isSelf, onClose }: EditRolesFormProps) => {
  const update = useUpdateUser();
  const notice = useNotice();
  const { form, frame } = useApiForm<UserRolesInput>(userRolesSchema, {
    defaultValues: { roles: roleOrder.filter((role) => user.roles.includes(role)) },
    fields: ['roles'],
  });

  const send = async ({ roles }: UserRolesInput) => {
    // A disabled checkbox is left out of the form's values: keep your own admin role.
    const next = isSelf && user.roles.includes('admin') && !roles.includes('admin') ? [...roles, 'admin' as const] : roles;
    await update.mutateAsync({ id: user.id, roles: next });
    notice.show({ title: 'Roles saved', text: `${user.name} is now ${next.map((role) => roleLabels[role]).join(', ') || 'without a role'}.` });
    onClose();
  };

  const lockedAdmin = isSelf && user.roles.includes('admin');
  return (
    <FormFrame {...frame(send, update.isPending)} onCancel={onClose} submitLabel="Save roles" submitDisabled={!form.formState.isDirty}>
      <RoleCheckboxes
        form={form}
        locked={lockedAdmin ? ['admin'] : []}
        lockedHint="Your own admin role: another admin has to remove it, so the co-op is never left without one."
      />
    </FormFrame>
  );
};

export const EditRolesDialog = ({ user, currentUserId, onClose }: EditRolesDialogProps) => (
  <FormDialog open={user !== null} onClose={onClose} title={user ? `Roles of ${user.name}` : 'Roles'} description={user?.email}>
    {user ? <EditRolesForm user={user} isSelf={user.id === currentUserId} onClose={onClose} /> : null}
  </FormDialog>
);
