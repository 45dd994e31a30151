import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { auditSortFields, auditSubjectTypes, type AuditChange, type AuditEntry } from '../../../../shared/schemas/audit.ts';
import { Forbidden } from '@/components/errors/forbidden';
import { dateTimeCell, FilterField, FilterSelect, ListTable, useListQuery } from '@/components/list-kit';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import { paths, invoiceHref } from '@/config/paths';
import { auditListQuery, auditPeopleQuery, auditTrailRequest, useAuditTrail } from '@/features/audit/api/get-audit';
import { cellarPaths } from '@/config/cellar-paths';
import { useUsers } from '@/features/users/api/get-users';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { formatDateTime } from '@/utils/format';

const subjectTypeLabels = Object.fromEntries(auditSubjectTypes.map((t) => [t, t.replace(/([a-z])([A-Z])/g, '$1 $2')])) as Record<
  (typeof auditSubjectTypes)[number],
  string
>;

/** Where a record of the trail has a screen of its own. */
function recordHref(e: Pick<AuditEntry, 'subjectType' | 'subjectId'>): string | null {
  const id = e.subjectId;
  if (!id) return null;
  switch (e.subjectType) {
    case 'Batch':
      return `${paths.batches}/${encodeURIComponent(id)}`;
    case 'Equipment':
      return `${paths.cellar}/${encodeURIComponent(id)}`;
    case 'Keg':
      return cellarPaths.keg(id);
    case 'Invoice':
      return invoiceHref(id);
    case 'Setting':
    case 'BillingProfile':
      return paths.settings;
    default:
      return null;
  }
}

const actionLabel = (a: string) => a.replace(/[_:]/g, ' ');
const fieldLabel = (f: string) => f.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase();
function show(v: unknown): string {
  if (v === null || v === undefined || v === '') return '—';
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (typeof v === 'string') return /^\d{4}-\d{2}-\d{2}T/.test(v) ? formatDateTime(v) : v;
  if (typeof v === 'number') return String(v);
  const s = JSON.stringify(v);
  return s.length > 120 ? `${s.slice(0, 117)}…` : s;
}

/** Before and after, one changed field a line; a field the action only set shows its new value. */
const Changes = ({ changes }: { changes: AuditChange[] }) =>
  changes.length === 0 ? (
    <span className="text-ink-muted">—</span>
  ) : (
    <ul className="flex min-w-56 flex-col gap-0.5 text-xs">
      {changes.slice(0, 12).map((c) => (
        <li key={c.field}>
          <span className="font-medium">{c.field === 'from → to' ? 'changed' : fieldLabel(c.field)}</span>:{' '}
          {c.before !== null ? (
            <>
              <del className="text-ink-muted">{show(c.before)}</del> → <ins className="no-underline">{show(c.after)}</ins>
            </>
          ) : (
            show(c.after)
          )}
        </li>
      ))}
      {changes.length > 12 ? <li className="text-ink-muted">and {changes.length - 12} more</li> : null}
    </ul>
  );

const column = createColumnHelper<AuditEntry>();
const auditText = { caption: 'Audit trail', noun: ['change', 'changes'] as const };

/** The audit trail: who changed what and when, before and after; filtered, sorted and paged on the server. */
const AuditRoute = () => {
  useDocumentTitle('Audit trail');
  const ability = useAppAbility();
  const allowed = ability.can('read', 'AuditLog');
  const { query, setQuery, hasFilters: filtered, clearFilters } = useListQuery(auditListQuery);
  const people = useUsers(auditPeopleQuery);
  const trail = useAuditTrail(allowed ? auditTrailRequest(query) : {});

  const columns = useMemo(
    () => [
      column.accessor('at', { header: 'When', sortDescFirst: true, cell: dateTimeCell }),
      column.accessor((e) => e.actorName ?? '', {
        id: 'actor',
        header: 'Who',
        cell: ({ row }) =>
          row.original.actorId ? (
            <button
              type="button"
              className="text-left underline decoration-dotted"
              onClick={() => setQuery({ actorId: row.original.actorId! })}
              title="Show only this person"
            >
              {row.original.actorName ?? 'Removed account'}
            </button>
          ) : (
            <span className="text-ink-muted">The system</span>
          ),
      }),
      column.accessor('action', { header: 'What', cell: ({ getValue }) => <span className="whitespace-nowrap">{actionLabel(getValue())}</span> }),
      column.accessor('subjectType', {
        header: 'Record',
        cell: ({ row }) => {
          const e = row.original;
          const href = recordHref(e);
          const code = typeof (e.detail as { code?: unknown } | null)?.code === 'string' ? (e.detail as { code: string }).code : null;
          const label = `${e.subjectType}${code ? ` ${code}` : e.subjectId ? ` ${e.subjectId.length > 13 ? `${e.subjectId.slice(0, 8)}…` : e.subjectId}` : ''}`;
          return href ? (
            <Link to={href} className="whitespace-nowrap">
              {label}
            </Link>
          ) : (
            <span className="whitespace-nowrap">{label}</span>
          );
        },
      }),
      column.display({ id: 'changes', header: 'Before → after', cell: ({ row }) => <Changes changes={row.original.changes} /> }),
    ],
    [setQuery],
  );

  if (!allowed) return <Forbidden what="the audit trail" />;
  const emptyText = filtered ? 'Nothing matches these filters.' : 'Nothing recorded yet.';
  return (
    <div className="flex flex-col gap-4">
      <header>
        <h1 className="text-2xl">Audit trail</h1>
        <p className="mt-1 text-ink-muted">Every change to the co-op’s records: who made it, when, and what it changed. Newest first.</p>
      </header>
      <form
        className="grid gap-2 sm:grid-cols-2 lg:grid-cols-[14rem_12rem_1fr_10rem_10rem]"
        role="search"
        aria-label="Filter the audit trail"
        onSubmit={(e) => e.preventDefault()}
      >
        <FilterField label="Person">
          <Select value={query.actorId ?? ''} onChange={(e) => setQuery({ actorId: e.target.value || undefined })}>
            <option value="">Anyone</option>
            {people.data?.items.map((u) => (
              <option key={u.id} value={u.id}>
                {u.name}
              </option>
            ))}
          </Select>
        </FilterField>
        <FilterSelect
          label="Record type"
          value={auditSubjectTypes.find((t) => t === query.subjectType)}
          onChange={(subjectType) => setQuery({ subjectType })}
          options={subjectTypeLabels}
          anyLabel="Any"
        />
        <FilterField label="Record id">
          <Input
            key={query.subjectId ?? ''}
            defaultValue={query.subjectId ?? ''}
            placeholder="The record's id"
            onBlur={(e) => setQuery({ subjectId: e.target.value.trim() || undefined })}
            onKeyDown={(e) => {
              if (e.key === 'Enter') setQuery({ subjectId: e.currentTarget.value.trim() || undefined });
            }}
          />
        </FilterField>
        <FilterField label="From">
          <Input type="date" value={query.from ?? ''} max={query.to} onChange={(e) => setQuery({ from: e.target.value || undefined })} />
        </FilterField>
        <FilterField label="To">
          <Input type="date" value={query.to ?? ''} min={query.from} onChange={(e) => setQuery({ to: e.target.value || undefined })} />
        </FilterField>
      </form>
      {filtered ? (
        <div>
          <Button variant="ghost" onClick={clearFilters}>
            Clear the filters
          </Button>
        </div>
      ) : null}
      <ListTable list={trail} query={query} onQueryChange={setQuery} columns={columns} sortFields={auditSortFields} empty={emptyText} {...auditText} />
    </div>
  );
};

export default AuditRoute;
