import { lazy, Suspense, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { TodayBestBefore, TodayCellarSection, TodayMemberSection, TodayMoneySection } from '../../../../shared/schemas/today.ts';
import { inspectionKindLabels } from '../../../../shared/schemas/inspections.ts';
import { Badge } from '@/components/ui/badge';
import { paths } from '@/config/paths';
import { Money } from '@/features/billing/components/money';
import { cellarPaths } from '@/config/cellar-paths';
import { formatDate, formatDateTime, pluralize } from '@/utils/format';

// The bar chart (recharts) loads only for those who see the books.
const AgeingChart = lazy(async () => ({ default: (await import('@/features/billing/components/ageing-chart')).AgeingChart }));

const Card = ({
  title,
  count,
  tone,
  children,
  action,
}: {
  title: string;
  count?: number;
  tone?: 'due' | 'ready' | 'danger';
  children: ReactNode;
  action?: ReactNode;
}) => (
  <section className="flex flex-col gap-2 rounded-md border border-line bg-surface p-4" aria-label={title}>
    <header className="flex items-baseline justify-between gap-2">
      <h3 className="text-sm font-semibold">{title}</h3>
      {count !== undefined ? <Badge tone={count > 0 ? (tone ?? 'due') : 'ready'}>{count}</Badge> : null}
    </header>
    <div className="text-sm">{children}</div>
    {action ? <div className="mt-auto pt-1 text-sm">{action}</div> : null}
  </section>
);

const Empty = ({ children }: { children: ReactNode }) => <p className="text-ink-muted">{children}</p>;
const rows = 'flex flex-col divide-y divide-line';
const row = 'flex items-baseline justify-between gap-3 py-1.5';

const whereWords: Record<string, string> = { cellar: 'cellar', cold_room: 'cold room', with_member: 'with a member', missing: 'missing' };

/** Kegs still holding beer past or near their best-before (the co-op's warning days, Settings › Shelf life). */
const BestBeforeCard = ({ list, mine = false }: { list: TodayBestBefore; mine?: boolean }) => (
  <Card
    title={mine ? 'Your kegs near best-before' : 'Kegs near best-before'}
    count={list.total}
    tone={list.items.some((k) => k.state === 'past') ? 'danger' : 'due'}
  >
    {list.total === 0 ? (
      <Empty>
        {mine ? 'No keg with you is within' : 'No keg holding beer is within'} {pluralize(list.nearDays, 'day')} of its best-before.
      </Empty>
    ) : (
      <ul className={rows}>
        {list.items.map((k) => (
          <li key={k.kegId} className={row}>
            <Link to={cellarPaths.keg(k.kegId)}>
              {k.code} · {k.batchName}
            </Link>
            <span className={k.state === 'past' ? 'font-medium text-danger' : 'text-ink-muted'}>
              {k.state === 'past' ? 'past best-before' : 'best before'} {formatDate(k.bestBefore)}
              {mine ? '' : ` · ${k.tapCode ? `on ${k.tapCode}` : (k.memberName ?? whereWords[k.whereabouts] ?? k.whereabouts)}`}
            </span>
          </li>
        ))}
        {list.total > list.items.length ? <li className="py-1.5 text-ink-muted">and {list.total - list.items.length} more</li> : null}
      </ul>
    )}
  </Card>
);

export const MemberToday = ({ section }: { section: TodayMemberSection }) => (
  <div className="grid gap-3 md:grid-cols-2">
    <Card title="Your bookings" count={section.bookings.length} tone="ready" action={<Link to={paths.bookings}>Book equipment</Link>}>
      {section.bookings.length === 0 ? (
        <Empty>Nothing booked. Pick a free fermenter or keg on the calendar.</Empty>
      ) : (
        <ul className={rows}>
          {section.bookings.map((b) => (
            <li key={b.id} className={row}>
              <Link to={`${paths.cellar}/${b.equipmentId}`}>
                {b.equipmentCode} · {b.equipmentName}
              </Link>
              <span className="text-ink-muted tabular-nums">
                {formatDate(b.startsAt)} – {formatDate(b.endsAt)} {b.state === 'in_use' ? <Badge tone="copper">in use</Badge> : null}
              </span>
            </li>
          ))}
        </ul>
      )}
    </Card>
    <Card title="Your batches" count={section.batches.length} tone="ready" action={<Link to={paths.batches}>All batches</Link>}>
      {section.batches.length === 0 ? (
        <Empty>No batch on the go.</Empty>
      ) : (
        <ul className={rows}>
          {section.batches.map((b) => (
            <li key={b.id} className={row}>
              <Link to={`${paths.batches}/${b.id}`}>{b.name}</Link>
              <span className="text-ink-muted tabular-nums">
                {b.latestSg ? `${b.latestSg.toFixed(3)} on ${formatDate(b.latestAt)}` : 'no reading yet'} · {b.status}
              </span>
            </li>
          ))}
        </ul>
      )}
    </Card>
    <Card title="Kegs with you" count={section.kegs.length} tone={section.kegs.some((k) => k.overdue) ? 'danger' : 'ready'}>
      {section.kegs.length === 0 ? (
        <Empty>No co-op kegs out with you.</Empty>
      ) : (
        <ul className={rows}>
          {section.kegs.map((k) => (
            <li key={k.id} className={row}>
              <Link to={cellarPaths.keg(k.id)}>{k.code}</Link>
              <span className={k.overdue ? 'font-medium text-danger' : 'text-ink-muted'}>
                {k.dueAt ? `${k.overdue ? 'overdue since' : 'due back'} ${formatDate(k.dueAt)}` : 'no due date'}
              </span>
            </li>
          ))}
        </ul>
      )}
    </Card>
    {section.bestBefore.total > 0 ? <BestBeforeCard list={section.bestBefore} mine /> : null}
    {section.balance ? (
      <Card title="Your balance" action={<Link to={paths.myInvoices}>Your invoices</Link>}>
        <p className="text-xl">
          <Money cents={section.balance.balanceCents} currency={section.balance.currency} />
        </p>
        <p className="text-ink-muted">
          {section.balance.openInvoices === 0
            ? 'Nothing to pay.'
            : `${pluralize(section.balance.openInvoices, 'open invoice')}${section.balance.overdueInvoices ? `, ${section.balance.overdueInvoices} past due` : ''}.`}
        </p>
      </Card>
    ) : null}
  </div>
);

export const CellarToday = ({ section }: { section: TodayCellarSection }) => (
  <div className="grid gap-3 md:grid-cols-2">
    <Card title="Transfers due" count={section.transfersDue.length}>
      {section.transfersDue.length === 0 ? (
        <Empty>No fermenter booking ends in the next three days with beer still in it.</Empty>
      ) : (
        <ul className={rows}>
          {section.transfersDue.map((t) => (
            <li key={t.batchId} className={`${row} flex-wrap`}>
              <Link to={`${paths.batches}/${t.batchId}`}>
                {t.fermenterCode} · {t.batchName}
              </Link>
              <span className="text-ink-muted">
                {t.ownerName}, booking ends {formatDateTime(t.bookingEndsAt)}
              </span>
              <Link to={cellarPaths.newTransfer({ batchId: t.batchId })} aria-label={`Transfer ${t.batchName} to kegs`}>
                Transfer to kegs
              </Link>
            </li>
          ))}
        </ul>
      )}
    </Card>
    <Card title="Hand-overs in the next 24 hours" count={section.handovers.length} tone={section.handovers.some((h) => !h.ready) ? 'danger' : 'ready'}>
      {section.handovers.length === 0 ? (
        <Empty>No fermenter or keg changes hands today.</Empty>
      ) : (
        <ul className={rows}>
          {section.handovers.map((h) => (
            <li key={h.bookingId} className={row}>
              <Link to={`${paths.cellar}/${h.equipmentId}`}>{h.equipmentCode}</Link>
              <span className="flex items-baseline gap-2 text-ink-muted">
                {formatDateTime(h.startsAt)}
                <Badge tone={h.ready ? 'ready' : 'danger'}>{h.ready ? 'ready' : h.equipmentState.replace('_', ' ')}</Badge>
              </span>
            </li>
          ))}
        </ul>
      )}
    </Card>
    <Card title="Vessels to clean" count={section.needsCleaning.total} action={<Link to={cellarPaths.recordCycle()}>Record a cycle</Link>}>
      {section.needsCleaning.total === 0 ? (
        <Empty>Every fermenter and keg is clean or holding beer.</Empty>
      ) : (
        <ul className={rows}>
          {section.needsCleaning.items.map((v) => (
            <li key={v.id} className={row}>
              <Link to={cellarPaths.recordCycle(v.id)}>
                {v.code} · {v.name}
              </Link>
              <span className="text-ink-muted">{v.nextBookingAt ? `needed ${formatDate(v.nextBookingAt)}` : v.state.replace('_', ' ')}</span>
            </li>
          ))}
          {section.needsCleaning.total > section.needsCleaning.items.length ? (
            <li className="py-1.5 text-ink-muted">and {section.needsCleaning.total - section.needsCleaning.items.length} more</li>
          ) : null}
        </ul>
      )}
    </Card>
    <Card title="Kegs overdue" count={section.overdueKegs.total} tone="danger" action={<Link to={cellarPaths.overdue}>Overdue kegs</Link>}>
      {section.overdueKegs.total === 0 ? (
        <Empty>Every keg out with a member is inside its due date.</Empty>
      ) : (
        <ul className={rows}>
          {section.overdueKegs.items.map((k) => (
            <li key={k.id} className={row}>
              <Link to={cellarPaths.keg(k.id)}>{k.code}</Link>
              <span className="text-ink-muted">
                {k.memberName ? `${k.memberName}, ` : ''}due {formatDate(k.dueAt)}
              </span>
            </li>
          ))}
        </ul>
      )}
    </Card>
    <BestBeforeCard list={section.bestBefore} />
    {section.inspectionsDue ? <InspectionsDueCard due={section.inspectionsDue} /> : null}
  </div>
);

/** Kegs and cylinders whose pressure test, relief valve, seals or hydrostatic test failed, is past due or due soon. */
const InspectionsDueCard = ({ due }: { due: NonNullable<TodayCellarSection['inspectionsDue']> }) => (
  <Card
    title="Inspections due"
    count={due.total}
    tone={due.items.some((i) => i.status !== 'due_soon') ? 'danger' : 'due'}
    action={<Link to="/cellar/maintenance">Maintenance list</Link>}
  >
    {due.total === 0 ? (
      <Empty>Every keg and cylinder is inside its test dates.</Empty>
    ) : (
      <ul className={rows}>
        {due.items.map((i) => (
          <li key={`${i.equipment.id}-${i.kind}`} className={row}>
            <Link to={`/cellar/${i.equipment.id}`}>{i.equipment.code}</Link>
            <span className="flex items-center gap-2 text-ink-muted">
              {inspectionKindLabels[i.kind]} {i.status === 'failed' ? 'failed' : `${i.status === 'overdue' ? 'was due' : 'due'} ${formatDate(i.dueAt)}`}
              {i.status !== 'due_soon' ? <Badge tone="danger">Not to be used</Badge> : null}
            </span>
          </li>
        ))}
      </ul>
    )}
  </Card>
);

export const MoneyToday = ({ section }: { section: TodayMoneySection }) => (
  <div className="grid gap-3 md:grid-cols-2">
    <Card title="Unpaid invoices" count={section.unpaid.count} action={<Link to={`${paths.billingInvoices}?status=issued`}>Open invoices</Link>}>
      <p className="text-xl">
        <Money cents={section.unpaid.totalCents} currency={section.currency} />
      </p>
      <p className="text-ink-muted">
        {section.overdue.count ? (
          <>
            {pluralize(section.overdue.count, 'invoice')} past due: <Money cents={section.overdue.totalCents} currency={section.currency} />
          </>
        ) : (
          'Nothing past due.'
        )}
      </p>
    </Card>
    <Card title="Invoice run" action={<Link to={paths.billingRun}>Run {section.suggestedPeriod}</Link>}>
      <p>
        {section.lastRun ? `Last run: ${section.lastRun.period}, ${pluralize(section.lastRun.invoiceCount, 'invoice')}.` : 'No run yet.'}
        {section.drafts ? ` ${pluralize(section.drafts, 'draft')} waiting to be issued.` : ''}
      </p>
    </Card>
    <Card title="Open amounts by age (days since invoice)">
      <Suspense fallback={<div className="h-56" />}>
        <AgeingChart totals={section.ageing} currency={section.currency} />
      </Suspense>
      <dl className="grid grid-cols-4 gap-2 text-xs">
        {(['0-30', '31-60', '61-90', '90+'] as const).map((b) => (
          <div key={b}>
            <dt className="text-ink-muted">{b} days</dt>
            <dd>
              <Money cents={section.ageing[b]} currency={section.currency} />
            </dd>
          </div>
        ))}
      </dl>
    </Card>
  </div>
);
