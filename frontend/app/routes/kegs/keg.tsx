import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { subject } from '../../../../shared/permissions/ability.ts';
import { PageHeader, QueryFallback } from '@/components/layouts/page-header';
import { Alert } from '@/components/ui/alert';
import { Button, ButtonLink } from '@/components/ui/button';
import { DataTablePagination } from '@/components/ui/data-table';
import { useNotice } from '@/components/ui/notice';
import { Spinner } from '@/components/ui/spinner';
import { parentPages } from '@/config/paths';
import { useKeg, useKegHistory } from '@/features/kegs/api/kegs';
import { usePlanAction } from '@/features/carbonation/api/carbonation';
import { Cautions } from '@/components/safety/cautions';
import { BeerNotes, BestBefore, FillGauge, Whereabouts } from '@/features/kegs/components/keg-bits';
import { CheckOutDialog, EndingDialog, KegNotice, LevelDialog, MoveDialog, type Notice, type Open } from '@/features/kegs/components/keg-dialogs';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { RemindKegButton } from '@/features/reminders/reminders';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatAbv, formatDate, formatDateTime } from '@/utils/format';

const KegRoute = () => {
  const { kegId = '' } = useParams();
  const keg = useKeg(kegId);
  const ability = useAppAbility();
  const units = useUnits();
  const [open, setOpen] = useState<Open>(null);
  const [page, setPage] = useState(1);
  const plan = usePlanAction();
  const [error, setError] = useState<string | null>(null);
  // The app's notice for most actions; a return, emptying or dump gets its own message, which offers Undo.
  const notice = useNotice();
  const [kegNotice, setKegNotice] = useState<Notice | null>(null);
  // A new action makes the last one's message stale.
  const openDialog = (o: Open) => {
    notice.clear();
    setKegNotice(null);
    setOpen(o);
  };
  const memberId = keg.data?.keg.member?.id ?? '';
  const canHistory = ability.can('readOwner', subject('Keg', { memberId }));
  const history = useKegHistory(kegId, page, Boolean(keg.data) && canHistory);
  useDocumentTitle(keg.data ? `${keg.data.keg.code} · Kegs` : 'Kegs');

  if (keg.isPending || keg.isError) return <QueryFallback query={keg} what="keg" />;
  const k = keg.data.keg;
  const canMove = ability.can('checkout', subject('Keg', { memberId }));
  const run = async (fn: () => Promise<unknown>) => {
    setError(null);
    try {
      await fn();
    } catch (e) {
      setError(problemMessage(e));
    }
  };
  const c = k.carbonation;
  return (
    <div className="flex flex-col gap-5">
      <PageHeader
        parent={parentPages.kegs}
        title={k.code}
        badge={<StateBadge state={k.state} />}
        intro={[k.name, k.capacityLiters ? units.volume(k.capacityLiters) : '', k.lock ? `${k.lock} lock` : '', k.serial ? `serial ${k.serial}` : '']
          .filter(Boolean)
          .join(' · ')}
        actions={
          <Link to={`/cellar/${k.id}`} className="text-sm">
            Registry page and bookings
          </Link>
        }
      />
      {error ? <Alert tone="error">{error}</Alert> : null}
      {kegNotice ? (
        <KegNotice
          key={kegNotice.undo?.id ?? kegNotice.text}
          kegId={k.id}
          notice={kegNotice}
          onUndone={(n, e) => {
            setKegNotice(n);
            setError(e ?? null);
          }}
        />
      ) : null}

      <div className="grid gap-4 lg:grid-cols-2">
        <section className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4" aria-labelledby="where-title">
          <h2 id="where-title" className="text-base">
            Where it is
          </h2>
          <div className="text-base">
            <Whereabouts keg={k} />
          </div>
          {k.since ? <p className="text-xs text-ink-muted">Since {formatDateTime(k.since)}</p> : null}
          {k.overdue && ability.can('remind', subject('Keg', { memberId })) ? (
            <RemindKegButton kegId={k.id} code={k.code} lastRemindedAt={k.lastRemindedAt} />
          ) : null}
          {canMove ? (
            <div className="flex flex-wrap gap-2">
              {k.whereabouts === 'with_member' ? (
                <Button className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('return')}>
                  Returned…
                </Button>
              ) : k.state !== 'out_of_service' && k.whereabouts !== 'missing' ? (
                <Button className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('check-out')}>
                  Check out to a member
                </Button>
              ) : null}
              {k.whereabouts !== 'with_member' ? (
                <Button variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('move')}>
                  {k.whereabouts === 'missing' ? 'Found it' : 'Move'}
                </Button>
              ) : null}
            </div>
          ) : null}
        </section>

        <section className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4" aria-labelledby="holds-title">
          <h2 id="holds-title" className="text-base">
            What it holds
          </h2>
          {k.contents ? (
            <>
              <p className="text-base font-medium">{k.contents.batchName}</p>
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-ink-muted">Style</dt>
                <dd>{k.contents.style || '—'}</dd>
                <dt className="text-ink-muted">OG / FG</dt>
                <dd>
                  {k.contents.og?.toFixed(3) ?? '—'} / {k.contents.fg?.toFixed(3) ?? '—'}
                </dd>
                <dt className="text-ink-muted">ABV</dt>
                <dd>
                  {formatAbv(k.contents.abv)} <span className="text-xs text-ink-muted">(label and tax: local rules govern)</span>
                </dd>
                <dt className="text-ink-muted">Filled</dt>
                <dd>
                  {formatDateTime(k.contents.filledAt)} · {units.volume(k.contents.volumeLiters)}
                </dd>
                <dt className="text-ink-muted">Best before</dt>
                <dd>
                  <BestBefore contents={k.contents} />
                </dd>
                <BeerNotes contents={k.contents} />
                {k.contents.dissolvedOxygenPpb !== null ? (
                  <>
                    <dt className="text-ink-muted">Dissolved O₂</dt>
                    <dd>{k.contents.dissolvedOxygenPpb} ppb at filling</dd>
                  </>
                ) : null}
                <dt className="text-ink-muted">Left</dt>
                <dd>
                  <FillGauge keg={k} />
                </dd>
              </dl>
              {canMove ? (
                <div className="flex flex-wrap gap-2">
                  <Button variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('level')}>
                    Note the level
                  </Button>
                  {ability.can('update', 'Equipment') ? (
                    <Button variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('empty')}>
                      Emptied…
                    </Button>
                  ) : null}
                  {ability.can('update', 'Equipment') ? (
                    <Button variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => openDialog('dump')}>
                      Dumped…
                    </Button>
                  ) : null}
                </div>
              ) : null}
            </>
          ) : (
            <>
              <p className="text-ink-muted">Empty.</p>
              {ability.can('create', 'SanitationCycle') && k.state !== 'out_of_service' ? (
                <div className="flex flex-wrap gap-2">
                  <ButtonLink
                    to={cellarPaths.recordCycle(k.id)}
                    variant={k.state === 'ready' ? 'secondary' : 'primary'}
                    className="min-h-12 md:min-h-12 pointer-coarse:min-h-12"
                  >
                    Record a cycle
                  </ButtonLink>
                  {k.state === 'ready' && ability.can('create', 'Transfer') ? (
                    <ButtonLink to={cellarPaths.newTransfer({ kegIds: [k.id] })} variant="primary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
                      Transfer into it
                    </ButtonLink>
                  ) : null}
                </div>
              ) : null}
              {k.freshUntil && k.state === 'ready' ? <p className="text-xs text-ink-muted">Ready until {formatDateTime(k.freshUntil)}</p> : null}
            </>
          )}
        </section>
      </div>

      {k.contents ? (
        <section className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4" aria-labelledby="carb-title">
          <h2 id="carb-title" className="text-base">
            Carbonation
          </h2>
          {c ? (
            <>
              <p>
                {c.method === 'fast_start' ? 'Fast start' : 'Set and hold'} to {c.targetVolumes.toFixed(1)} volumes at {units.pressure(c.servingPressureKpa)}{' '}
                serving pressure
                {c.fastPressureKpa ? ` (fast start at ${units.pressure(c.fastPressureKpa)})` : ''}; ready about {formatDate(c.readyAt)}.
              </p>
              {c.lowerPressureAt && !c.pressureLoweredAt ? (
                <Alert
                  tone={new Date(c.lowerPressureAt) <= new Date() ? 'error' : 'info'}
                  title={`Lower the pressure to ${units.pressure(c.servingPressureKpa)} at ${formatDateTime(c.lowerPressureAt)}`}
                >
                  {ability.can('update', subject('CarbonationPlan', { memberId })) ? (
                    <Button
                      className="mt-2 min-h-12 md:min-h-12 pointer-coarse:min-h-12"
                      pending={plan.isPending}
                      onClick={() => run(() => plan.mutateAsync({ planId: c.planId, action: 'pressure-lowered' }))}
                    >
                      I lowered the pressure
                    </Button>
                  ) : null}
                </Alert>
              ) : null}
            </>
          ) : (
            <p className="text-ink-muted">No carbonation plan yet.</p>
          )}
          {ability.can('create', 'CarbonationPlan') ? (
            <div>
              <ButtonLink to={cellarPaths.carbonation(k.id)} variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
                {c ? 'Change the plan' : 'Plan carbonation'}
              </ButtonLink>
            </div>
          ) : null}
          <Cautions kind="carbonation" />
        </section>
      ) : null}

      {canHistory ? (
        <section className="rounded-lg border border-line bg-surface p-4" aria-labelledby="history-title">
          <h2 id="history-title" className="text-base">
            History
          </h2>
          {history.isPending ? (
            <Spinner label="Loading the history" />
          ) : (
            <ol className="mt-2 divide-y divide-line text-sm">
              {history.data?.items.map((h, i) => (
                <li key={`${h.kind}-${h.refId}-${i}`} className="flex flex-wrap justify-between gap-2 py-2">
                  <span>
                    <span className="font-medium">{h.title}</span>
                    {h.detail ? <span className="block text-xs text-ink-muted">{h.detail}</span> : null}
                  </span>
                  <span className="text-right text-xs text-ink-muted">
                    {formatDateTime(h.at)}
                    {h.actor ? <span className="block">{h.actor}</span> : null}
                  </span>
                </li>
              ))}
            </ol>
          )}
          <DataTablePagination page={page} pageSize={50} total={history.data?.total ?? 0} onPageChange={setPage} noun={['event', 'events']} />
        </section>
      ) : null}

      {open === 'check-out' ? <CheckOutDialog keg={k} onClose={() => setOpen(null)} /> : null}
      {open === 'move' ? <MoveDialog keg={k} onClose={() => setOpen(null)} /> : null}
      {open === 'level' ? <LevelDialog keg={k} onClose={() => setOpen(null)} /> : null}
      {open === 'return' || open === 'empty' || open === 'dump' ? (
        <EndingDialog keg={k} ending={open} onClose={() => setOpen(null)} onDone={(n) => setKegNotice(n)} />
      ) : null}
    </div>
  );
};

export default KegRoute;
