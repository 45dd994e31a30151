import { useCallback, useState } from 'react';
import { Link } from 'react-router-dom';
import type { User } from '../../../../shared/schemas/user.ts';
import { useClampPage, useListQuery } from '@/components/list-kit';
import { useNotice } from '@/components/ui/notice';
import { paths } from '@/config/paths';
import { userListQuery, useUsers } from '@/features/users/api/get-users';
import { EditRolesDialog } from '@/features/users/components/edit-roles-dialog';
import { InviteUserDialog } from '@/features/users/components/invite-user-dialog';
import { SetActiveDialog } from '@/features/users/components/set-active-dialog';
import { UsersTable } from '@/features/users/components/users-table';
import { UsersToolbar } from '@/features/users/components/users-toolbar';
import { useDevMailboxAvailable } from '@/lib/dev-mailbox';

export interface MembersDirectoryProps {
  currentUserId: string;
}

/** The admin's list of people: search, filter, sort and page on the server; invite; roles; (de)activate. */
export const MembersDirectory = ({ currentUserId }: MembersDirectoryProps) => {
  const { query, setQuery, hasFilters, clearFilters } = useListQuery(userListQuery);
  const users = useUsers(query);
  const mailbox = useDevMailboxAvailable();
  const [inviting, setInviting] = useState(false);
  const [editing, setEditing] = useState<User | null>(null);
  const [toggling, setToggling] = useState<User | null>(null);
  const notice = useNotice();

  // Past the last page (after filtering or deactivating): go to the last one there is.
  useClampPage(users, query, setQuery);

  const onEditRoles = useCallback((user: User) => setEditing(user), []);
  const onToggleActive = useCallback((user: User) => setToggling(user), []);

  return (
    <div className="flex flex-col gap-4">
      <UsersToolbar query={query} onQueryChange={setQuery} hasFilters={hasFilters} onClearFilters={clearFilters} onInvite={() => setInviting(true)} />

      <UsersTable
        query={query}
        list={users}
        currentUserId={currentUserId}
        onQueryChange={setQuery}
        onEditRoles={onEditRoles}
        onToggleActive={onToggleActive}
        hasFilters={hasFilters}
      />

      <InviteUserDialog
        open={inviting}
        onClose={() => setInviting(false)}
        onInvited={(user) => {
          setInviting(false);
          notice.show({
            text: (
              <>
                Invitation sent to {user.name} ({user.email}).
                {mailbox ? (
                  <>
                    {' '}
                    In development the e-mail lands in the <Link to={paths.outbox}>Outbox</Link>.
                  </>
                ) : null}
              </>
            ),
          });
        }}
      />
      <EditRolesDialog user={editing} currentUserId={currentUserId} onClose={() => setEditing(null)} />
      <SetActiveDialog
        user={toggling}
        onClose={() => setToggling(null)}
        onDone={(user) => {
          setToggling(null);
          notice.show({ text: `${user.name} is ${user.isActive ? 'active again' : 'deactivated'}.` });
        }}
      />
    </div>
  );
};
