import { createColumnHelper, type Row } from '@tanstack/react-table';
import { useMemo } from 'react';
import { userSortFields, type User, type UserListQuery } from '../../../../shared/schemas/user.ts';
import { dateCell, dateTimeCell, ListTable, type ListProps } from '@/components/list-kit';
import { RoleBadges } from '@/components/role-badges';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';

export interface UsersTableProps extends ListProps<User, UserListQuery> {
  currentUserId: string;
  onEditRoles: (user: User) => void;
  onToggleActive: (user: User) => void;
  hasFilters: boolean;
}

const column = createColumnHelper<User>();
const userListText = { caption: 'Members of the co-op', noun: ['person', 'people'] as const };
const inactiveRow = (row: Row<User>) => (row.original.isActive ? undefined : 'text-ink-muted');

export const UsersTable = ({ query, list, currentUserId, onQueryChange, onEditRoles, onToggleActive, hasFilters }: UsersTableProps) => {
  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Name',
        cell: ({ row }) => (
          <span className="font-medium text-ink">
            {row.original.name}
            {row.original.id === currentUserId ? <span className="ml-1.5 text-xs font-normal text-ink-muted">(you)</span> : null}
          </span>
        ),
        meta: { className: 'min-w-40' },
      }),
      column.accessor('email', {
        header: 'E-mail',
        cell: ({ getValue }) => <span className="whitespace-nowrap text-ink-muted">{getValue()}</span>,
      }),
      column.accessor('roles', {
        header: 'Roles',
        enableSorting: false,
        cell: ({ getValue }) => <RoleBadges roles={getValue()} />,
        meta: { className: 'min-w-44' },
      }),
      column.accessor('isActive', {
        header: 'Active',
        enableSorting: false,
        cell: ({ getValue }) => (getValue() ? <Badge tone="ready">Active</Badge> : <Badge tone="muted">Inactive</Badge>),
      }),
      column.accessor('lastLoginAt', {
        header: 'Last sign-in',
        sortDescFirst: true,
        cell: (cell) => (cell.getValue() ? dateTimeCell(cell) : <span className="text-ink-muted">Never</span>),
      }),
      column.accessor('createdAt', { header: 'Created', sortDescFirst: true, cell: dateCell }),
      column.display({
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        cell: ({ row }) => {
          const user = row.original;
          const self = user.id === currentUserId;
          return (
            <div className="flex justify-end gap-1.5">
              <Button variant="secondary" size="sm" onClick={() => onEditRoles(user)} aria-label={`Edit roles of ${user.name}`}>
                Edit roles
              </Button>
              <Button
                variant="ghost"
                size="sm"
                onClick={() => onToggleActive(user)}
                disabled={self}
                title={self ? "You can't deactivate your own account" : undefined}
                aria-label={`${user.isActive ? 'Deactivate' : 'Reactivate'} ${user.name}`}
              >
                {user.isActive ? 'Deactivate' : 'Reactivate'}
              </Button>
            </div>
          );
        },
        meta: { className: 'text-right w-px whitespace-nowrap' },
      }),
    ],
    [currentUserId, onEditRoles, onToggleActive],
  );

  const empty = hasFilters ? 'Nobody matches these filters.' : 'Nobody here yet. Invite someone to get started.';
  return <ListTable {...{ query, list, onQueryChange, columns, empty }} sortFields={userSortFields} rowClassName={inactiveRow} {...userListText} />;
};
