import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { useCallback, useMemo } from 'react';
import { listQuerySchema } from '../../../../shared/schemas/pagination.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { useMailbox, type MailboxMessage } from '@/features/mailbox/api/get-mailbox';
import { useSearchParamsState } from '@/hooks/use-search-params-state';
import { MessageText } from '@/features/mailbox/components/message-text';
import { isApiProblem } from '@/lib/api-client';
import { cn } from '@/utils/cn';
import { formatDateTime } from '@/utils/format';

const column = createColumnHelper<MailboxMessage>();
const recipients = (to: MailboxMessage['to']) => (Array.isArray(to) ? to.join(', ') : to);
const pageQuerySchema = listQuerySchema.pick({ page: true, pageSize: true });

/** The development mailbox: every e-mail the server "sent", newest first, readable in place. */
export const Outbox = () => {
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const parsed = pageQuerySchema.safeParse(Object.fromEntries(searchParams));
  const query = parsed.success ? parsed.data : { page: 1, pageSize: 50 };
  const openId = searchParams.get('message');
  const mailbox = useMailbox(query);

  const update = useCallback(
    (change: Record<string, string | null>) =>
      updateSearchParams((previous) => {
        const next = new URLSearchParams(previous);
        for (const [key, value] of Object.entries(change)) {
          if (value === null) next.delete(key);
          else next.set(key, value);
        }
        return next;
      }),
    [updateSearchParams],
  );

  const columns = useMemo(
    () => [
      column.accessor('subject', {
        header: 'Subject',
        cell: ({ row }) => {
          const open = row.original.id === openId;
          return (
            <button
              type="button"
              onClick={() => update({ message: open ? null : row.original.id })}
              aria-expanded={open}
              aria-controls="outbox-message"
              className="min-h-11 text-left font-medium text-copper-strong hover:underline md:min-h-6 pointer-coarse:min-h-11"
            >
              {row.original.subject || '(no subject)'}
            </button>
          );
        },
      }),
      column.accessor('to', {
        header: 'To',
        cell: ({ getValue }) => <span className="whitespace-nowrap text-ink-muted">{recipients(getValue())}</span>,
      }),
      column.accessor('receivedAt', {
        header: 'Received',
        cell: ({ getValue }) => (
          <time dateTime={getValue()} className="whitespace-nowrap">
            {formatDateTime(getValue())}
          </time>
        ),
        meta: { className: 'w-px' },
      }),
    ],
    [openId, update],
  );

  const table = useReactTable({
    data: mailbox.data?.items ?? [],
    columns,
    getRowId: (message) => message.id,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    enableSorting: false,
    rowCount: mailbox.data?.total ?? 0,
  });

  if (isApiProblem(mailbox.error) && mailbox.error.status === 404) {
    return (
      <Alert title="No outbox on this server">The outbox only exists while the server runs in development mode; in production, e-mails go out for real.</Alert>
    );
  }

  const opened = mailbox.data?.items.find((message) => message.id === openId) ?? null;

  return (
    <div className="grid gap-4 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <div className="flex min-w-0 flex-col gap-3">
        <div className="flex items-center justify-between gap-3">
          <p className="text-sm text-ink-muted">
            E-mails the server sent while in development. Open one to read it and follow its links, such as an invitation.
          </p>
          <Button variant="secondary" size="sm" onClick={() => void mailbox.refetch()} pending={mailbox.isFetching}>
            Refresh
          </Button>
        </div>
        <DataTable
          table={table}
          caption="Outbox"
          isLoading={mailbox.isPending}
          error={mailbox.error}
          onRetry={() => void mailbox.refetch()}
          isFetching={mailbox.isFetching}
          empty="No e-mails yet. Invite someone, or ask for a password reset, and it shows up here."
          rowClassName={(row) => cn(row.original.id === openId && 'bg-copper-soft/40')}
        />
        <DataTablePagination
          page={query.page}
          pageSize={query.pageSize}
          total={mailbox.data?.total ?? 0}
          isPlaceholder={mailbox.isPlaceholderData}
          onPageChange={(page) => update({ page: String(page), message: null })}
          noun={['e-mail', 'e-mails']}
        />
      </div>

      <section
        id="outbox-message"
        aria-label="Message"
        aria-live="polite"
        className="min-w-0 rounded-md border border-line bg-surface p-4 xl:sticky xl:top-20 xl:self-start"
      >
        {opened ? (
          <article className="flex flex-col gap-3">
            <header className="flex flex-col gap-1 border-b border-line pb-3">
              <h2 className="text-base">{opened.subject || '(no subject)'}</h2>
              <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-xs text-ink-muted">
                <dt>From</dt>
                <dd className="break-all">{opened.from}</dd>
                <dt>To</dt>
                <dd className="break-all">{recipients(opened.to)}</dd>
                <dt>Received</dt>
                <dd>{formatDateTime(opened.receivedAt)}</dd>
              </dl>
            </header>
            <MessageText text={opened.text} />
            <div>
              <Button variant="ghost" size="sm" onClick={() => update({ message: null })}>
                Close
              </Button>
            </div>
          </article>
        ) : (
          <p className="text-sm text-ink-muted">Pick an e-mail to read it here.</p>
        )}
      </section>
    </div>
  );
};
