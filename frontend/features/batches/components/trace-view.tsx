import { Link } from 'react-router-dom';
import type { BatchTrace, TraceFill } from '../../../../shared/schemas/trace.ts';
import { Badge } from '@/components/ui/badge';
import { cellarPaths } from '@/config/cellar-paths';
import { useUnits } from '@/hooks/use-units';
import { formatDate } from '@/utils/format';

const whereWords: Record<string, string> = { cellar: 'Cellar', cold_room: 'Cold room', with_member: 'With a member', missing: 'Missing' };

/** Where a keg is now, while it holds the batch: a member (named when the viewer may know), a tap, the cellar. */
const NowCell = ({ f }: { f: TraceFill }) => {
  if (!f.holdsBatch) return <span className="text-ink-muted">Emptied {formatDate(f.emptiedAt)}</span>;
  if (f.whereabouts === 'with_member') {
    return (
      <span>
        {f.holder?.name ?? 'With a member'}
        {f.dueAt ? <span className="block text-xs text-ink-muted">due back {formatDate(f.dueAt)}</span> : null}
      </span>
    );
  }
  if (f.tap)
    return (
      <span>
        On tap {f.tap.code}
        {f.tap.position ? <span className="block text-xs text-ink-muted">{f.tap.position}</span> : null}
      </span>
    );
  if (f.whereabouts === 'missing') return <Badge tone="danger">Missing</Badge>;
  return <span>{whereWords[f.whereabouts] ?? f.whereabouts}</span>;
};

/** The beer's allergen notes, finings and vegan flag, as the trace and the keg show them. */
export const TraceFacts = ({ trace }: { trace: Pick<BatchTrace, 'allergens' | 'finings' | 'vegan'> }) => (
  <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
    <dt className="text-ink-muted">Allergens</dt>
    <dd>{trace.allergens.length ? trace.allergens.join(', ') : 'none noted'}</dd>
    <dt className="text-ink-muted">Finings</dt>
    <dd>{trace.finings.length ? trace.finings.map((f) => `${f.kind} (${f.dose} ${f.unit})`).join(', ') : 'none'}</dd>
    <dt className="text-ink-muted">Vegan</dt>
    <dd>
      <Badge tone={trace.vegan ? 'ready' : 'neutral'}>{trace.vegan ? 'Vegan' : 'Not vegan'}</Badge>
    </dd>
  </dl>
);

/** Every keg of a batch: when it was filled, its best-before, where it is now, who took it and which taps served it. */
export const TraceTable = ({ trace }: { trace: BatchTrace }) => {
  const units = useUnits();
  if (!trace.fills.length) return <p className="text-sm text-ink-muted">Not in any keg yet.</p>;
  return (
    <div className="overflow-x-auto rounded-md border border-line">
      <table className="w-full min-w-[40rem] text-left text-sm" aria-label={`Kegs of ${trace.batch.name}`}>
        <thead className="bg-ground-deep text-xs text-ink-muted">
          <tr>
            <th className="px-3 py-2 font-medium">Keg</th>
            <th className="px-3 py-2 font-medium">Filled</th>
            <th className="px-3 py-2 font-medium">Best before</th>
            <th className="px-3 py-2 font-medium">Where now</th>
            <th className="px-3 py-2 font-medium">Taken out by</th>
            <th className="px-3 py-2 font-medium">Served on</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {trace.fills.map((f) => (
            <tr key={f.fillId} className="align-top">
              <td className="px-3 py-2">
                <Link to={cellarPaths.keg(f.kegId)} className="font-medium">
                  {f.code}
                </Link>
                <span className="block text-xs text-ink-muted">{units.volume(f.volumeLiters)}</span>
              </td>
              <td className="px-3 py-2 tabular-nums">{formatDate(f.filledAt)}</td>
              <td className="px-3 py-2 tabular-nums">
                {f.bestBefore ? formatDate(f.bestBefore) : '—'}
                {f.bestBeforeState === 'past' ? (
                  <Badge tone="danger" className="ml-1">
                    past
                  </Badge>
                ) : f.bestBeforeState === 'near' ? (
                  <Badge tone="due" className="ml-1">
                    near
                  </Badge>
                ) : null}
              </td>
              <td className="px-3 py-2">
                <NowCell f={f} />
              </td>
              <td className="px-3 py-2 text-xs">{f.takenBy.length ? f.takenBy.map((m) => `${m.name ?? 'a member'} ${formatDate(m.at)}`).join(', ') : '—'}</td>
              <td className="px-3 py-2 text-xs">{f.servedOn.length ? f.servedOn.map((s) => `${s.code} ${formatDate(s.at)}`).join(', ') : '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
};
