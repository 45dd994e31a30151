import type { User } from '../../../../shared/schemas/user.ts';
import { ConfirmDialog } from '@/components/ui/dialog';
import { useUpdateUser } from '@/features/users/api/update-user';
import { problemMessage } from '@/lib/api-client';

export interface SetActiveDialogProps {
  user: User | null;
  onClose: () => void;
  onDone: (user: User) => void;
}

/** Confirm before deactivating (signs them out, blocks sign-in) or reactivating someone. */
export const SetActiveDialog = ({ user, onClose, onDone }: SetActiveDialogProps) => {
  const update = useUpdateUser();
  const deactivating = user?.isActive ?? true;
  const close = () => {
    update.reset();
    onClose();
  };
  return (
    <ConfirmDialog
      open={user !== null}
      title={user ? `${deactivating ? 'Deactivate' : 'Reactivate'} ${user.name}?` : ''}
      confirmLabel={deactivating ? 'Deactivate' : 'Reactivate'}
      pending={update.isPending}
      error={update.isError ? problemMessage(update.error) : null}
      onClose={close}
      onConfirm={() => {
        if (!user) return;
        update.mutate(
          { id: user.id, isActive: !user.isActive },
          {
            onSuccess: ({ user: saved }) => {
              update.reset();
              onDone(saved);
            },
          },
        );
      }}
    >
      {deactivating ? (
        <p>
          {user?.name} ({user?.email}) will be signed out and can't sign in until someone reactivates them. Their bookings, batches and invoices stay as they
          are.
        </p>
      ) : (
        <p>
          {user?.name} ({user?.email}) will be able to sign in again with their current password, with the roles they had.
        </p>
      )}
    </ConfirmDialog>
  );
};
