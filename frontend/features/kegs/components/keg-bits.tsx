import { kegWhereaboutsLabels, type KegContents, type KegView } from '../../../../shared/schemas/kegs.ts';
import { Badge } from '@/components/ui/badge';
import { useUnits } from '@/hooks/use-units';
import { formatDate } from '@/utils/format';

/** Where a keg is, in words: the cellar, a tap in the cold room, a member (and when it is due back), missing. */
export const Whereabouts = ({ keg }: { keg: KegView }) => {
  if (keg.whereabouts === 'with_member') {
    return (
      <span className="flex flex-wrap items-center gap-1.5">
        <span>{keg.member ? keg.member.name : kegWhereaboutsLabels.with_member}</span>
        {keg.dueAt ? <span className="text-xs text-ink-muted">due {formatDate(keg.dueAt)}</span> : null}
        {keg.overdue ? <Badge tone="due">Overdue</Badge> : null}
      </span>
    );
  }
  if (keg.whereabouts === 'cold_room') return <span>{keg.tap ? `Cold room, on ${keg.tap.code}` : 'Cold room'}</span>;
  if (keg.whereabouts === 'missing') return <Badge tone="danger">Missing</Badge>;
  return <span>{kegWhereaboutsLabels[keg.whereabouts]}</span>;
};

/** How full the co-op thinks a keg is: a bar and the litres (or gallons). */
export const FillGauge = ({ keg, large = false }: { keg: KegView; large?: boolean }) => {
  const units = useUnits();
  if (!keg.contents) return <span className="text-ink-muted">Empty</span>;
  const capacity = keg.capacityLiters ?? keg.contents.volumeLiters;
  const share = Math.max(0, Math.min(1, keg.contents.remainingLiters / capacity));
  return (
    <span className={`flex items-center gap-2 ${large ? 'text-base' : 'text-xs'}`}>
      <span
        role="meter"
        aria-valuemin={0}
        aria-valuemax={capacity}
        aria-valuenow={keg.contents.remainingLiters}
        aria-label={`About ${units.volume(keg.contents.remainingLiters)} left`}
        className={`relative block overflow-hidden rounded-sm border border-line-strong bg-ground-deep ${large ? 'h-4 w-40' : 'h-2.5 w-16'}`}
      >
        <span className={`absolute inset-y-0 left-0 ${share < 0.2 ? 'bg-due' : 'bg-copper'}`} style={{ width: `${Math.round(share * 100)}%` }} />
      </span>
      <span className="whitespace-nowrap">{units.volume(keg.contents.remainingLiters)}</span>
    </span>
  );
};

/** Best-before of a fill, with a badge once it is near or past. */
export const BestBefore = ({ contents }: { contents: KegContents }) =>
  contents.bestBefore ? (
    <span className="inline-flex flex-wrap items-center gap-1.5">
      <span>{formatDate(contents.bestBefore)}</span>
      {contents.bestBeforeState === 'past' ? (
        <Badge tone="danger">Past best-before</Badge>
      ) : contents.bestBeforeState === 'near' ? (
        <Badge tone="due">Near best-before</Badge>
      ) : null}
    </span>
  ) : (
    <span className="text-ink-muted">not recorded</span>
  );

/** Finings and allergen notes that came with the beer, and whether it is vegan. */
export const BeerNotes = ({ contents, compact = false }: { contents: KegContents; compact?: boolean }) => {
  const finings = contents.finings.length ? contents.finings.map((f) => `${f.kind} (${f.dose} ${f.unit})`).join(', ') : 'none';
  const allergens = contents.allergens.length ? contents.allergens.join(', ') : 'none noted';
  if (compact) {
    return (
      <p className="flex flex-wrap items-center gap-1.5 text-xs text-ink-muted">
        <span>Allergens: {allergens}</span>
        {contents.finings.length ? <span>· Finings: {finings}</span> : null}
        <Badge tone={contents.vegan ? 'ready' : 'neutral'}>{contents.vegan ? 'Vegan' : 'Not vegan'}</Badge>
      </p>
    );
  }
  return (
    <>
      <dt className="text-ink-muted">Finings</dt>
      <dd>{finings}</dd>
      <dt className="text-ink-muted">Allergens</dt>
      <dd>{allergens}</dd>
      <dt className="text-ink-muted">Vegan</dt>
      <dd>{contents.vegan ? 'Yes' : 'No'}</dd>
    </>
  );
};
