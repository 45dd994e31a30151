import { Link } from 'react-router-dom';
import { ListPager, useListQuery } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Spinner } from '@/components/ui/spinner';
import { overdueListQuery, useOverdueKegs } from '@/features/kegs/api/kegs';
import { cellarPaths } from '@/config/cellar-paths';
import { RemindKegButton } from '@/features/reminders/reminders';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDate } from '@/utils/format';

const daysLate = (due: string) => Math.max(1, Math.floor((Date.now() - new Date(due).getTime()) / 86_400_000));

/** Kegs past their due date, oldest first: who has them and for how long. */
const OverdueKegsRoute = () => {
  useDocumentTitle('Overdue kegs');
  const { query, setQuery } = useListQuery(overdueListQuery);
  const overdue = useOverdueKegs(query);
  const ability = useAppAbility();
  if (overdue.isPending) return <Spinner label="Loading overdue kegs" />;
  if (overdue.isError) return <Alert tone="error">{problemMessage(overdue.error)}</Alert>;
  return (
    <div className="flex flex-col gap-3">
      {overdue.data.items.length === 0 ? (
        <Alert tone="success">No keg is overdue.</Alert>
      ) : (
        <ul className="divide-y divide-line rounded-lg border border-line bg-surface" aria-label="Overdue kegs">
          {overdue.data.items.map((k) => (
            <li key={k.id} className="flex flex-wrap items-center justify-between gap-3 px-3 py-3">
              <div>
                <Link to={cellarPaths.keg(k.id)} className="text-base font-semibold">
                  {k.code}
                </Link>{' '}
                <span className="text-ink-muted">{k.member ? `with ${k.member.name}` : 'with you'}</span>
                <p className="text-sm text-ink-muted">
                  Due {formatDate(k.dueAt)} · <span className="font-medium text-due-strong">{daysLate(k.dueAt!)} days late</span>
                  {k.contents ? ` · ${k.contents.batchName}` : ''}
                </p>
              </div>
              <div className="flex flex-wrap items-start gap-2">
                {ability.can('remind', 'Keg') ? <RemindKegButton kegId={k.id} code={k.code} lastRemindedAt={k.lastRemindedAt} /> : null}
                <Link
                  to={cellarPaths.keg(k.id)}
                  className="inline-flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 items-center rounded-md border border-line-strong px-4 text-sm no-underline hover:no-underline"
                >
                  Open
                </Link>
              </div>
            </li>
          ))}
        </ul>
      )}
      <ListPager list={overdue} query={query} onQueryChange={setQuery} noun={['overdue keg', 'overdue kegs']} pageSizes={false} />
    </div>
  );
};

export default OverdueKegsRoute;
