import { useId } from 'react';
import { roleLabels, roles } from '../../../../shared/permissions/roles.ts';
import { roleSchema, type UserListQuery } from '../../../../shared/schemas/user.ts';
import { SearchInput, type ListProps } from '@/components/list-kit';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/input';

export interface UsersToolbarProps extends Pick<ListProps<unknown, UserListQuery>, 'query' | 'onQueryChange'> {
  hasFilters: boolean;
  onClearFilters: () => void;
  onInvite: () => void;
}

const groupClass = 'flex flex-col gap-1';
const labelClass = 'text-xs font-medium text-ink-muted';

export const UsersToolbar = ({ query, onQueryChange, hasFilters, onClearFilters, onInvite }: UsersToolbarProps) => {
  const id = useId();
  return (
    <div className="flex flex-wrap items-end gap-3">
      <form role="search" className="contents" onSubmit={(event) => event.preventDefault()}>
        <div className={`${groupClass} w-full sm:w-64`}>
          <label htmlFor={`${id}-q`} className={labelClass}>
            Search
          </label>
          <SearchInput
            id={`${id}-q`}
            value={query.q}
            onSearch={(q, options) => onQueryChange({ q }, options)}
            placeholder="Name or e-mail"
            spellCheck={false}
          />
        </div>
      </form>
      <div className={`${groupClass} w-[calc(50%-0.375rem)] sm:w-44`}>
        <label htmlFor={`${id}-role`} className={labelClass}>
          Role
        </label>
        <Select
          id={`${id}-role`}
          value={query.role ?? ''}
          onChange={(event) => {
            const parsed = roleSchema.safeParse(event.target.value);
            onQueryChange({ role: parsed.success ? parsed.data : undefined });
          }}
        >
          <option value="">All roles</option>
          {roles.map((role) => (
            <option key={role} value={role}>
              {roleLabels[role]}
            </option>
          ))}
        </Select>
      </div>
      <div className={`${groupClass} w-[calc(50%-0.375rem)] sm:w-40`}>
        <label htmlFor={`${id}-active`} className={labelClass}>
          Status
        </label>
        <Select
          id={`${id}-active`}
          value={query.active === undefined ? '' : String(query.active)}
          onChange={(event) => {
            const value = event.target.value;
            onQueryChange({ active: value === '' ? undefined : value === 'true' });
          }}
        >
          <option value="">Everyone</option>
          <option value="true">Active</option>
          <option value="false">Inactive</option>
        </Select>
      </div>
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
};
