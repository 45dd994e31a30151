import { useEffect, useId, useState } from 'react';
import { roleLabels, roles } from '../../../../shared/permissions/roles.ts';
import { roleSchema, type UserListQuery } from '../../../../shared/schemas/user.ts';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import type { UserListQueryPatch } from '@/features/users/hooks/use-users-search-params';

export interface UsersToolbarProps {
  query: UserListQuery;
  onQueryChange: (patch: UserListQueryPatch, options?: { replace?: boolean }) => void;
  onInvite: () => void;
}

const groupClass = 'flex flex-col gap-1';
const labelClass = 'text-xs font-medium text-ink-muted';

export const UsersToolbar = ({ query, onQueryChange, onInvite }: UsersToolbarProps) => {
  const [text, setText] = useState(query.q ?? '');
  const id = useId();

  // Follow the URL when it changes underneath (Back, a cleared filter).
  useEffect(() => setText(query.q ?? ''), [query.q]);

  // Search as you type, a moment after the last key.
  useEffect(() => {
    const value = text.trim();
    if (value === (query.q ?? '')) return;
    const timer = setTimeout(() => onQueryChange({ q: value || undefined }, { replace: true }), 300);
    return () => clearTimeout(timer);
  }, [text, query.q, onQueryChange]);

  const filtered = Boolean(query.q || query.role || query.active !== undefined);

  return (
    <div className="flex flex-wrap items-end gap-3">
      <form
        role="search"
        className="contents"
        onSubmit={(event) => {
          event.preventDefault();
          onQueryChange({ q: text.trim() || undefined });
        }}
      >
        <div className={`${groupClass} w-full sm:w-64`}>
          <label htmlFor={`${id}-q`} className={labelClass}>
            Search
          </label>
          <Input
            id={`${id}-q`}
            type="search"
            value={text}
            onChange={(event) => setText(event.target.value)}
            placeholder="Name or e-mail"
            autoComplete="off"
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
      {filtered ? (
        <Button
          variant="ghost"
          onClick={() => {
            setText('');
            onQueryChange({ q: undefined, role: undefined, active: undefined });
          }}
        >
          Clear filters
        </Button>
      ) : null}
      <Button className="ml-auto" onClick={onInvite}>
        Invite someone
      </Button>
    </div>
  );
};
