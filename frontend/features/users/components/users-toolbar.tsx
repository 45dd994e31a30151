import { roleLabels, roles } from '../../../../shared/permissions/roles.ts';
import type { UserListQuery } from '../../../../shared/schemas/user.ts';
import { FilterSelect, ListSearch, QueryFilter, type ListProps } from '@/components/list-kit';
import { Button } from '@/components/ui/button';

export interface UsersToolbarProps extends Pick<ListProps<unknown, UserListQuery>, 'query' | 'onQueryChange'> {
  hasFilters: boolean;
  onClearFilters: () => void;
  onInvite: () => void;
}

const statusLabels = { true: 'Active', false: 'Inactive' } as const;

export const UsersToolbar = ({ query, onQueryChange, hasFilters, onClearFilters, onInvite }: UsersToolbarProps) => (
  <div className="flex flex-wrap items-end gap-3">
    <form role="search" className="contents" onSubmit={(event) => event.preventDefault()}>
      <ListSearch
        label="Search"
        muted
        fieldClassName="w-full sm:w-64"
        query={query}
        onQueryChange={onQueryChange}
        placeholder="Name or e-mail"
        spellCheck={false}
      />
    </form>
    <QueryFilter
      name="role"
      label="Role"
      options={roles}
      labels={roleLabels}
      anyLabel="All roles"
      muted
      className="w-[calc(50%-0.375rem)] sm:w-44"
      query={query}
      onQueryChange={onQueryChange}
    />
    <FilterSelect
      label="Status"
      value={query.active === undefined ? undefined : String(query.active)}
      onChange={(value) => onQueryChange({ active: value === undefined ? undefined : value === 'true' })}
      options={statusLabels}
      anyLabel="Everyone"
      muted
      className="w-[calc(50%-0.375rem)] sm:w-40"
    />
    {hasFilters ? (
      <Button variant="ghost" onClick={onClearFilters}>
        Clear filters
      </Button>
    ) : null}
    <Button className="ml-auto" onClick={onInvite}>
      Invite someone
    </Button>
  </div>
);
