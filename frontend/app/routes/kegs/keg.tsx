import { useEffect, useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { subject } from '../../../../shared/permissions/ability.ts';
import type { KegUndoOfferView, KegView } from '../../../../shared/schemas/kegs.ts';
import { Alert } from '@/components/ui/alert';
import { Button, ButtonLink } from '@/components/ui/button';
import { DataTablePagination } from '@/components/ui/data-table';
import { ConfirmDialog, Dialog } from '@/components/ui/dialog';
import { useNotice } from '@/components/ui/notice';
import { PageLoader, Spinner } from '@/components/ui/spinner';
import { useKeg, useKegAction, useKegHistory, useMemberOptions, useTapBoard } from '@/features/kegs/api/kegs';
import { usePlanAction } from '@/features/carbonation/api/carbonation';
import { Cautions } from '@/components/safety/cautions';
import { BeerNotes, BestBefore, FillGauge, Whereabouts } from '@/features/kegs/components/keg-bits';
import { BigInput, BigSelect } from '@/components/ui/touch';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { RemindKegButton } from '@/features/reminders/reminders';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { fromDisplay, toDisplay } from '@/lib/units';
import { formatAbv, formatDate, formatDateTime } from '@/utils/format';

type Open = null | 'check-out' | 'move' | 'level' | Ending;
/** The actions that end what the keg holds: each confirms what it will change first. */
type Ending = 'return' | 'empty' | 'dump';

const inDays = (d: number) => {
  const t = new Date(Date.now() + d * 86_400_000);
  return t.toISOString().slice(0, 10);
};

const CheckOutDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const members = useMemberOptions(true);
  const act = useKegAction(keg.id);
  const [memberId, setMemberId] = useState('');
  const [due, setDue] = useState(inDays(21));
  const [error, setError] = useState<string | null>(null);
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`Check ${keg.code} out`} description="To a member, with the date it is due back.">
      <form
        className="flex flex-col gap-3"
        onSubmit={async (e) => {
          e.preventDefault();
          setError(null);
          try {
            await act.mutateAsync({ action: 'check-out', body: { memberId, dueAt: new Date(`${due}T18:00:00`).toISOString() } });
            onClose();
          } catch (err) {
            setError(problemMessage(err));
          }
        }}
      >
        {error ? <Alert tone="error">{error}</Alert> : null}
        <label className="flex flex-col gap-1 text-sm font-medium">
          Member
          <BigSelect value={memberId} onChange={(e) => setMemberId(e.target.value)} required>
            <option value="">Pick a member…</option>
            {members.data?.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </BigSelect>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Due back
          <BigInput type="date" value={due} min={inDays(1)} onChange={(e) => setDue(e.target.value)} required />
        </label>
        <Button type="submit" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" pending={act.isPending} disabled={!memberId}>
          Check out
        </Button>
      </form>
    </Dialog>
  );
};

const MoveDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const board = useTapBoard();
  const act = useKegAction(keg.id);
  const [to, setTo] = useState<'cellar' | 'cold_room' | 'missing'>(keg.whereabouts === 'cold_room' ? 'cellar' : 'cold_room');
  const [tapId, setTapId] = useState('');
  const [error, setError] = useState<string | null>(null);
  const free = board.data?.taps.filter((t) => (!t.taken || t.keg?.id === keg.id) && t.state !== 'out_of_service') ?? [];
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`Move ${keg.code}`}>
      <form
        className="flex flex-col gap-3"
        onSubmit={async (e) => {
          e.preventDefault();
          setError(null);
          try {
            await act.mutateAsync({ action: 'move', body: { to, tapId: to === 'cold_room' && tapId ? tapId : null } });
            onClose();
          } catch (err) {
            setError(problemMessage(err));
          }
        }}
      >
        {error ? <Alert tone="error">{error}</Alert> : null}
        <label className="flex flex-col gap-1 text-sm font-medium">
          To
          <BigSelect value={to} onChange={(e) => setTo(e.target.value as typeof to)}>
            <option value="cold_room">Cold room</option>
            <option value="cellar">Cellar</option>
            <option value="missing">Missing (not found)</option>
          </BigSelect>
        </label>
        {to === 'cold_room' && keg.state === 'holding' ? (
          <label className="flex flex-col gap-1 text-sm font-medium">
            On tap
            <BigSelect value={tapId} onChange={(e) => setTapId(e.target.value)}>
              <option value="">Not connected</option>
              {free.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.code} · {t.position}
                  {t.state === 'needs_cleaning' ? ' (line needs cleaning)' : ''}
                </option>
              ))}
            </BigSelect>
          </label>
        ) : null}
        <Button type="submit" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" pending={act.isPending}>
          Move
        </Button>
      </form>
    </Dialog>
  );
};

const LevelDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const units = useUnits();
  const act = useKegAction(keg.id);
  const [value, setValue] = useState(keg.contents ? toDisplay.volume(keg.contents.remainingLiters, units.units).toFixed(1) : '');
  const [error, setError] = useState<string | null>(null);
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`How much is left in ${keg.code}?`} description="By weight or by eye; the tap board shows it.">
      <form
        className="flex flex-col gap-3"
        onSubmit={async (e) => {
          e.preventDefault();
          setError(null);
          try {
            await act.mutateAsync({ action: 'level', body: { remainingLiters: Math.round(fromDisplay.volume(Number(value), units.units) * 100) / 100 } });
            onClose();
          } catch (err) {
            setError(problemMessage(err));
          }
        }}
      >
        {error ? <Alert tone="error">{error}</Alert> : null}
        <label className="flex flex-col gap-1 text-sm font-medium">
          Left ({units.labels.volume})
          <BigInput type="number" inputMode="decimal" step="0.1" min={0} value={value} onChange={(e) => setValue(e.target.value)} required />
        </label>
        <Button type="submit" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" pending={act.isPending}>
          Save
        </Button>
      </form>
    </Dialog>
  );
};

const endingVerbs: Record<Ending, { title: (code: string) => string; confirm: string; done: (code: string) => string }> = {
  return: {
    title: (code) => `Record ${code} as returned?`,
    confirm: 'Record it returned',
    done: (code) => `${code} recorded as returned; clean it before it is filled again.`,
  },
  empty: {
    title: (code) => `Record ${code} as emptied?`,
    confirm: 'Record it emptied',
    done: (code) => `${code} recorded as emptied; clean it before it is filled again.`,
  },
  dump: {
    title: (code) => `Record the beer in ${code} as dumped (poured away)?`,
    confirm: 'Record it dumped',
    done: (code) => `The beer in ${code} recorded as dumped; clean the keg before it is filled again.`,
  },
};

/** A success message; after a return, an emptying or a dump it offers to undo it. */
interface Notice {
  text: string;
  undo?: KegUndoOfferView | null;
}

/**
 * The message after an action. "Undo" shows until the server's offer ends (the page's clock is the
 * server's); any other action on the page clears the message, and the server refuses an undo once
 * the keg was touched.
 */
const KegNotice = ({ kegId, notice, onUndone }: { kegId: string; notice: Notice; onUndone: (n: Notice | null, error?: string) => void }) => {
  const act = useKegAction(kegId);
  const until = notice.undo ? new Date(notice.undo.until).getTime() : 0;
  const [open, setOpen] = useState(() => until > Date.now());
  useEffect(() => {
    if (!until) return;
    const left = until - Date.now();
    if (left <= 0) return setOpen(false);
    const t = window.setTimeout(() => setOpen(false), left);
    return () => window.clearTimeout(t);
  }, [until]);
  const undo = notice.undo;
  return (
    <Alert tone="success">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <span>{notice.text}</span>
        {undo && open ? (
          <Button
            variant="secondary"
            className="min-h-11 md:min-h-9"
            pending={act.isPending}
            onClick={async () => {
              try {
                await act.mutateAsync({ action: 'undo', body: { actionId: undo.id } });
                onUndone({ text: 'Undone: the keg is back as it was, with its beer, carbonation plan and place.' });
              } catch (e) {
                setOpen(false);
                onUndone(null, problemMessage(e));
              }
            }}
          >
            Undo
          </Button>
        ) : null}
      </div>
    </Alert>
  );
};

/** Says what returning, emptying or dumping a keg will change before anything is recorded. */
const EndingDialog = ({ keg, ending, onClose, onDone }: { keg: KegView; ending: Ending; onClose: () => void; onDone: (notice: Notice) => void }) => {
  const units = useUnits();
  const act = useKegAction(keg.id);
  const [error, setError] = useState<string | null>(null);
  const c = keg.carbonation;
  const verbs = endingVerbs[ending];
  return (
    <ConfirmDialog
      open
      title={verbs.title(keg.code)}
      confirmLabel={verbs.confirm}
      pending={act.isPending}
      error={error}
      onClose={onClose}
      onConfirm={async () => {
        setError(null);
        try {
          const result = await act.mutateAsync(
            ending === 'return' ? { action: 'return', body: {} } : { action: 'empty', body: ending === 'dump' ? { dumped: true } : {} },
          );
          onDone({ text: verbs.done(keg.code), undo: result.undo ?? null });
          onClose();
        } catch (err) {
          setError(problemMessage(err));
        }
      }}
    >
      <ul className="flex list-disc flex-col gap-1 pl-5" aria-label="What this changes">
        {ending === 'return' ? (
          <li>
            {keg.code} comes back{keg.member ? ` from ${keg.member.name}` : ''} to the cellar.
          </li>
        ) : null}
        {keg.contents ? (
          <li>
            {units.volume(keg.contents.remainingLiters)} of {keg.contents.batchName} recorded in it{' '}
            {ending === 'dump' ? 'are written off as dumped (a loss)' : 'are written off'}; the keg then holds nothing.
          </li>
        ) : (
          <li>It holds no beer on record.</li>
        )}
        {c ? (
          <li>
            The carbonation plan ({c.method === 'fast_start' ? 'fast start' : 'set and hold'} to {c.targetVolumes.toFixed(1)} volumes) closes.
          </li>
        ) : (
          <li>No carbonation plan is open.</li>
        )}
        {ending !== 'return' && keg.tap ? <li>It comes off tap {keg.tap.code}, whose line then needs cleaning.</li> : null}
        {keg.state !== 'out_of_service' ? <li>{keg.code} needs cleaning before it is filled again.</li> : null}
      </ul>
      <p className="mt-2 font-medium">You can undo it for 10 minutes from the message that follows, as long as nothing else is done with the keg.</p>
    </ConfirmDialog>
  );
};

/** A keg's page: what it holds, where it is, its carbonation, and its whole history. */
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

  if (keg.isPending) return <PageLoader />;
  if (keg.isError)
    return (
      <Alert tone="error" title="This keg could not be shown">
        {problemMessage(keg.error)}
      </Alert>
    );
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
      <nav className="text-sm">
        <Link to={cellarPaths.kegs}>Kegs</Link> <span className="text-ink-faint">/</span> {k.code}
      </nav>
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="flex flex-wrap items-center gap-3 text-2xl">
            {k.code} <StateBadge state={k.state} />
          </h1>
          <p className="mt-1 text-ink-muted">
            {k.name}
            {k.capacityLiters ? ` · ${units.volume(k.capacityLiters)}` : ''}
            {k.lock ? ` · ${k.lock} lock` : ''}
            {k.serial ? ` · serial ${k.serial}` : ''}
          </p>
        </div>
        <Link to={`/cellar/${k.id}`} className="text-sm">
          Registry page and bookings
        </Link>
      </header>
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
