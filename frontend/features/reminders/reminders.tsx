import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/dialog';
import { billingKeys } from '@/features/billing/api/keys';
import { kegKeys } from '@/features/kegs/api/keys';
import { api, isApiProblem, problemMessage } from '@/lib/api-client';
import { formatDateTime, pluralize } from '@/utils/format';

/** After a reminder the server refuses another for its invoice or keg for this long (by the app's clock). */
const QUIET_MS = 24 * 3600_000;

interface SentReminder {
  id: string;
  sentTo: string;
  sentAt: string;
  remindAgainAfter: string;
}

/** A reminder sent within the quiet time: when another may be sent, else null. */
function quietUntil(lastRemindedAt: string | null | undefined): string | null {
  if (!lastRemindedAt) return null;
  const until = new Date(lastRemindedAt).getTime() + QUIET_MS;
  return until > Date.now() ? new Date(until).toISOString() : null;
}

function useRemind(url: string, invalidate: readonly unknown[]) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ reminder: SentReminder }>(url, {}),
    onSettled: () => queryClient.invalidateQueries({ queryKey: invalidate }),
  });
}

/** "Last reminded …" beside a remind button; nothing when never reminded. */
export const LastReminded = ({ at }: { at: string | null | undefined }) =>
  at ? <span className="text-sm text-ink-muted">Last reminded {formatDateTime(at)}</span> : null;

interface RemindButtonProps {
  url: string;
  invalidate: readonly unknown[];
  lastRemindedAt: string | null | undefined;
  /** Names what is reminded, for the button's accessible name on a list ("Remind about K-013"). */
  what: string;
  size?: 'sm' | 'md';
}

/**
 * One "Remind" button: sends the reminder (queued e-mail) and says to whom; within 24 hours of the
 * last one it is disabled and says when another can go. The server refuses a second reminder in that
 * time with 409 either way, so a double click sends one.
 */
const RemindButton = ({ url, invalidate, lastRemindedAt, what, size = 'md' }: RemindButtonProps) => {
  const remind = useRemind(url, invalidate);
  const sent = remind.data?.reminder;
  const quiet = quietUntil(sent?.sentAt ?? lastRemindedAt);
  const refused = remind.error && isApiProblem(remind.error) && remind.error.status === 409 ? remind.error : null;
  return (
    <div className="flex flex-col items-start gap-1">
      <div className="flex flex-wrap items-center gap-2">
        <Button
          variant="secondary"
          size={size}
          pending={remind.isPending}
          disabled={Boolean(quiet)}
          onClick={() => remind.mutate()}
          aria-label={`Remind about ${what}`}
        >
          Remind
        </Button>
        <LastReminded at={sent?.sentAt ?? lastRemindedAt} />
      </div>
      {sent ? (
        <p role="status" className="text-sm text-hop-strong">
          Reminder queued for {sent.sentTo}.
        </p>
      ) : quiet ? (
        <p className="text-sm text-ink-muted">Another reminder can be sent after {formatDateTime(quiet)}.</p>
      ) : null}
      {remind.error && !sent ? (
        <p role="alert" className="text-sm text-danger">
          {refused ? problemMessage(refused) : problemMessage(remind.error)}
        </p>
      ) : null}
    </div>
  );
};

export const RemindInvoiceButton = ({ invoiceId, number, lastRemindedAt }: { invoiceId: string; number: string | null; lastRemindedAt: string | null }) => (
  <RemindButton url={`/api/invoices/${invoiceId}/reminders`} invalidate={billingKeys.all} lastRemindedAt={lastRemindedAt} what={number ?? 'this invoice'} />
);

export const RemindKegButton = ({ kegId, code, lastRemindedAt, size }: { kegId: string; code: string; lastRemindedAt: string | null; size?: 'sm' | 'md' }) => (
  <RemindButton url={`/api/kegs/${kegId}/reminders`} invalidate={kegKeys.all} lastRemindedAt={lastRemindedAt} what={code} size={size} />
);

interface ReminderCount {
  overdue: number;
  toRemind: number;
  remindedRecently: number;
}

/** "Remind all overdue": asks first, naming how many members get a reminder, then sends them. */
export const RemindAllOverdueInvoices = () => {
  const queryClient = useQueryClient();
  const [open, setOpen] = useState(false);
  const count = useQuery({
    queryKey: billingKeys.reminders(),
    queryFn: ({ signal }) => api.get<ReminderCount>('/api/invoices/reminders', { signal }),
  });
  const send = useMutation({
    mutationFn: () => api.post<{ sent: number; skipped: number }>('/api/invoices/reminders', {}),
    onSuccess: () => setOpen(false),
    onSettled: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
  if (!count.data || count.data.overdue === 0) return null;
  const n = count.data.toRemind;
  return (
    <div className="flex flex-wrap items-center gap-3">
      <Button
        variant="secondary"
        disabled={n === 0}
        onClick={() => {
          send.reset();
          setOpen(true);
        }}
      >
        Remind all overdue ({n})
      </Button>
      <span className="text-sm text-ink-muted">
        {pluralize(count.data.overdue, 'overdue invoice')}
        {count.data.remindedRecently > 0 ? `, ${count.data.remindedRecently} reminded in the last 24 hours` : ''}
      </span>
      {send.data ? (
        <Alert tone="success">
          {pluralize(send.data.sent, 'reminder')} queued{send.data.skipped ? `; ${send.data.skipped} skipped (reminded recently or paid meanwhile)` : ''}.
        </Alert>
      ) : null}
      <ConfirmDialog
        open={open}
        title={`Send ${pluralize(n, 'reminder')}?`}
        confirmLabel={`Send ${pluralize(n, 'reminder')}`}
        pending={send.isPending}
        error={send.error ? problemMessage(send.error) : null}
        onClose={() => setOpen(false)}
        onConfirm={() => send.mutate()}
      >
        {n === 1 ? 'One member' : `${n} members`} with an overdue invoice will get an e-mail reminder, with what is still to pay and how. Invoices reminded in
        the last 24 hours are left out.
      </ConfirmDialog>
    </div>
  );
};
