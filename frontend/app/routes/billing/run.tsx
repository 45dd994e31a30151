import { Fragment, useEffect, useState } from 'react';
import { Link, Navigate, useSearchParams } from 'react-router-dom';
import { periodLabel } from '../../../../shared/billing/dates.ts';
import type { InvoiceRun, InvoiceSummary } from '../../../../shared/schemas/billing.ts';
import { figureHead, TableHead } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/dialog';
import { Input } from '@/components/ui/input';
import { Spinner } from '@/components/ui/spinner';
import { invoiceHref, paths } from '@/config/paths';
import { useBillingSummary, useRuns } from '@/features/billing/api/billing-overview';
import { useIssueRunDrafts, useRunPeriod, useRunPreview, useSendRun } from '@/features/billing/api/invoice-runs';
import { useManualCharges, useRemoveManualCharge } from '@/features/billing/api/manual-charges';
import { ManualChargeDialog } from '@/features/billing/components/manual-charge-dialog';
import { Money } from '@/features/billing/components/money';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

/** Run a period: pick the month, see what it will bill, add what no record covers, then run. */
const runHead = ['Member', figureHead('Lines'), figureHead('Net'), figureHead('Tax'), figureHead('Total')];

const RunRoute = () => {
  useDocumentTitle('Run a period');
  const ability = useAppAbility();
  const [params, setParams] = useSearchParams();
  const summary = useBillingSummary();
  const period = params.get('period') ?? summary.data?.suggestedPeriod ?? null;
  const preview = useRunPreview(period);
  const charges = useManualCharges(period ?? undefined);
  const removeCharge = useRemoveManualCharge();
  const runs = useRuns();
  const run = useRunPeriod();
  const issueDrafts = useIssueRunDrafts();
  const sendRun = useSendRun();
  const [result, setResult] = useState<{ run: InvoiceRun; invoices: InvoiceSummary[] } | null>(null);
  const [addOpen, setAddOpen] = useState(false);
  const [expanded, setExpanded] = useState<string | null>(null);
  const [sentNote, setSentNote] = useState<string | null>(null);
  /** Issuing cannot be taken back: the run, or the run's drafts, waits for a second yes. */
  const [confirming, setConfirming] = useState<'run' | 'drafts' | null>(null);
  useEffect(() => setResult(null), [period]);

  if (!canOnEvery(ability, 'read', 'Invoice')) return <Navigate to={paths.myInvoices} replace />;
  const p = preview.data;
  const toBill = p?.invoices.filter((i) => !i.alreadyInvoiced) ?? [];
  const already = p?.invoices.filter((i) => i.alreadyInvoiced) ?? [];
  const currency = p?.currency ?? summary.data?.currency ?? 'EUR';
  const runsOfPeriod = (runs.data?.items ?? []).filter((r) => r.period === period);

  const doRun = (issue: boolean) => {
    if (!period) return;
    setSentNote(null);
    run.mutate(
      { period, issue },
      {
        onSuccess: (r) => {
          setResult(r);
          setConfirming(null);
        },
      },
    );
  };
  const members = (n: number) => `${n} member${n === 1 ? '' : 's'}`;
  const invoices = (n: number) => `${n} invoice${n === 1 ? '' : 's'}`;

  return (
    <div className="flex flex-col gap-5">
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex flex-col gap-1 text-sm font-medium">
          Period
          <Input
            type="month"
            value={period ?? ''}
            onChange={(e) => e.target.value && setParams({ period: e.target.value }, { replace: true })}
            className="w-48"
          />
        </label>
        {period ? <p className="pb-2 text-ink-muted">{periodLabel(period)}</p> : null}
        <Button variant="secondary" className="ml-auto" onClick={() => setAddOpen(true)} disabled={!period}>
          Add a charge or credit
        </Button>
      </div>

      {preview.isPending && period ? (
        <p className="flex items-center gap-2 text-ink-muted">
          <Spinner className="size-4 text-copper" /> Working out the charges…
        </p>
      ) : null}
      {preview.isError ? <Alert tone="error">{problemMessage(preview.error)}</Alert> : null}

      {p ? (
        <section aria-labelledby="preview-title" className="flex flex-col gap-3">
          <div className="flex flex-wrap items-baseline justify-between gap-3">
            <h2 id="preview-title" className="text-base">
              Preview: {toBill.length} invoice{toBill.length === 1 ? '' : 's'} to make, <Money cents={p.totalCents} currency={currency} /> in all
            </h2>
            <p className="text-sm text-ink-muted">Read from: {p.sources.join(', ')}.</p>
          </div>
          {p.problems.length ? (
            <Alert tone="info" title="Not ready to run">
              <ul className="list-disc pl-5">
                {p.problems.map((x) => (
                  <li key={x}>{x}</li>
                ))}
              </ul>
            </Alert>
          ) : null}
          {toBill.length ? (
            <div className="overflow-hidden rounded-md border border-line bg-surface">
              <table className="w-full text-sm">
                <caption className="sr-only">What the run will bill, per member</caption>
                <TableHead cells={runHead} className="bg-ground-deep text-left text-xs tracking-wide text-ink-muted uppercase" cellClassName="px-3 py-2" />
                <tbody>
                  {toBill.map((i) => (
                    <Fragment key={i.memberId}>
                      <tr className="border-t border-line">
                        <td className="px-3 py-1.5">
                          <button
                            type="button"
                            className="text-left text-copper-strong hover:underline"
                            aria-expanded={expanded === i.memberId}
                            onClick={() => setExpanded(expanded === i.memberId ? null : i.memberId)}
                          >
                            {i.memberName}
                          </button>
                        </td>
                        <td className="px-3 py-1.5 text-right tabular-nums">{i.lines.length}</td>
                        <td className="px-3 py-1.5 text-right">
                          <Money cents={i.subtotalCents} currency={currency} />
                        </td>
                        <td className="px-3 py-1.5 text-right">
                          <Money cents={i.taxCents} currency={currency} />
                        </td>
                        <td className="px-3 py-1.5 text-right font-medium">
                          <Money cents={i.totalCents} currency={currency} />
                        </td>
                      </tr>
                      {expanded === i.memberId ? (
                        <tr className="bg-ground/60">
                          <td colSpan={5} className="px-3 py-2">
                            <ul className="flex flex-col gap-1">
                              {i.lines.map((l) => (
                                <li key={`${l.sourceType}:${l.sourceId}:${l.item}:${l.serviceFrom}`} className="flex justify-between gap-4">
                                  <span>
                                    {l.description} <span className="text-ink-muted">— {l.sourceLabel}</span>
                                  </span>
                                  <Money cents={l.amountCents} currency={currency} />
                                </li>
                              ))}
                            </ul>
                          </td>
                        </tr>
                      ) : null}
                    </Fragment>
                  ))}
                </tbody>
              </table>
            </div>
          ) : (
            <p className="text-ink-muted">
              {already.length ? `Everyone with charges in ${periodLabel(p.period)} has been billed already.` : 'Nothing to bill in this period.'}
            </p>
          )}
          {already.length ? (
            <p className="text-sm text-ink-muted">
              {already.length} member{already.length === 1 ? ' has' : 's have'} an invoice for this period already; a run never bills them twice.
            </p>
          ) : null}
          <div className="flex flex-wrap gap-2">
            <Button
              onClick={() => setConfirming('run')}
              pending={run.isPending && run.variables?.issue !== false}
              disabled={!p.canRun || toBill.length === 0 || run.isPending}
            >
              Run and issue {toBill.length} invoice{toBill.length === 1 ? '' : 's'}…
            </Button>
            <Button
              variant="secondary"
              onClick={() => doRun(false)}
              pending={run.isPending && run.variables?.issue === false}
              disabled={!p.canRun || toBill.length === 0 || run.isPending}
            >
              Make drafts to review first
            </Button>
          </div>
          {run.isError && !confirming ? <Alert tone="error">{problemMessage(run.error)}</Alert> : null}
          <ConfirmDialog
            open={confirming === 'run'}
            title={`Issue ${invoices(toBill.length)} for ${periodLabel(p.period)}?`}
            confirmLabel={`Issue ${invoices(toBill.length)}`}
            pending={run.isPending}
            error={run.isError ? problemMessage(run.error) : null}
            onClose={() => setConfirming(null)}
            onConfirm={() => doRun(true)}
          >
            <p>
              {invoices(toBill.length)} to {members(new Set(toBill.map((i) => i.memberId)).size)},{' '}
              <Money cents={toBill.reduce((sum, i) => sum + i.totalCents, 0)} currency={currency} /> in all.
            </p>
            <p className="mt-2">
              Issued invoices get their numbers and cannot be taken back: a mistake then needs a credit note. Make drafts first to review them.
            </p>
          </ConfirmDialog>
        </section>
      ) : null}

      {result ? (
        <Alert
          tone="success"
          title={`${periodLabel(result.run.period)}: ${result.invoices.length} invoice${result.invoices.length === 1 ? '' : 's'} ${result.run.issued ? 'issued' : 'made as drafts'}`}
        >
          <p>
            <Money cents={result.run.totalCents} currency={currency} /> in all.{' '}
            <Link to={`${paths.billingInvoices}?period=${result.run.period}`}>See them in the invoice list</Link>
          </p>
          <div className="mt-2 flex flex-wrap gap-2">
            {result.run.issued ? (
              <Button
                size="sm"
                pending={sendRun.isPending}
                onClick={() =>
                  sendRun.mutate(result.run.id, { onSuccess: (r) => setSentNote(`${r.queued} e-mail${r.queued === 1 ? '' : 's'} queued, each with its PDF.`) })
                }
              >
                E-mail them to the members
              </Button>
            ) : (
              <Button size="sm" pending={issueDrafts.isPending} onClick={() => setConfirming('drafts')}>
                Issue all drafts…
              </Button>
            )}
          </div>
          {sentNote ? <p className="mt-1">{sentNote}</p> : null}
          <ConfirmDialog
            open={confirming === 'drafts'}
            title={`Issue the ${invoices(result.invoices.length)} of this run?`}
            confirmLabel={`Issue ${invoices(result.invoices.length)}`}
            pending={issueDrafts.isPending}
            error={issueDrafts.isError ? problemMessage(issueDrafts.error) : null}
            onClose={() => setConfirming(null)}
            onConfirm={() =>
              issueDrafts.mutate(result.run.id, {
                onSuccess: () => {
                  setResult({ ...result, run: { ...result.run, issued: true } });
                  setConfirming(null);
                },
              })
            }
          >
            <p>
              {invoices(result.invoices.length)} to {members(new Set(result.invoices.map((i) => i.memberId)).size)},{' '}
              <Money cents={result.run.totalCents} currency={currency} /> in all.
            </p>
            <p className="mt-2">Issued invoices get their numbers and cannot be taken back: a mistake then needs a credit note.</p>
          </ConfirmDialog>
        </Alert>
      ) : null}

      <section aria-labelledby="charges-title" className="flex flex-col gap-2">
        <h2 id="charges-title" className="text-base">
          Manual charges and credits{period ? ` for ${periodLabel(period)}` : ''}
        </h2>
        {charges.data?.items.length ? (
          <ul className="divide-y divide-line rounded-md border border-line bg-surface text-sm">
            {charges.data.items.map((ch) => (
              <li key={ch.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
                <span>
                  <span className="font-medium">{ch.memberName}</span> · {ch.description}
                  <span className="block text-xs text-ink-muted">{ch.reason}</span>
                </span>
                <span className="flex items-center gap-3">
                  <Money cents={ch.amountCents} currency={currency} />
                  {ch.invoiceId ? (
                    <Link to={invoiceHref(ch.invoiceId)}>
                      <Badge tone="ready">On invoice</Badge>
                    </Link>
                  ) : (
                    <Button
                      size="sm"
                      variant="ghost"
                      onClick={() => removeCharge.mutate(ch.id)}
                      pending={removeCharge.isPending && removeCharge.variables === ch.id}
                      aria-label={`Remove ${ch.description} for ${ch.memberName}`}
                    >
                      Remove
                    </Button>
                  )}
                </span>
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-ink-muted">None for this period.</p>
        )}
      </section>

      {runsOfPeriod.length ? (
        <section className="text-sm text-ink-muted">
          <h2 className="text-base text-ink">Earlier runs of this period</h2>
          <ul className="mt-1">
            {runsOfPeriod.map((r) => (
              <li key={r.id}>
                {formatDateTime(r.createdAt)} by {r.runBy?.name ?? 'someone'}: {r.invoiceCount} invoice{r.invoiceCount === 1 ? '' : 's'},{' '}
                <Money cents={r.totalCents} currency={currency} />
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      {period ? <ManualChargeDialog open={addOpen} period={period} currency={currency} onClose={() => setAddOpen(false)} /> : null}
    </div>
  );
};

export default RunRoute;
