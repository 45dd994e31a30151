import { createColumnHelper, type Row } from '@tanstack/react-table';
import { useMemo } from 'react';
import { z } from 'zod';
import { dateTimeCell, defineListQuery, ListTable, pagingQuerySchema, useListQuery } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { useMailbox, type MailboxMessage } from '@/features/mailbox/api/get-mailbox';
import { MessageText } from '@/features/mailbox/components/message-text';
import { isApiProblem } from '@/lib/api-client';
import { cn } from '@/utils/cn';
import { formatDateTime } from '@/utils/format';

const column = createColumnHelper<MailboxMessage>();
const recipients = (to: MailboxMessage['to']) => (Array.isArray(to) ? to.join(', ') : to);
/** The page and the open message live in the URL, so a reload or Back shows the same e-mail. */
const outboxText = {
  caption: 'Outbox',
  empty: 'No e-mails yet. Invite someone, or ask for a password reset, and it shows up here.',
  noun: ['e-mail', 'e-mails'] as const,
  pageSizes: false as const,
};
const outboxQuery = defineListQuery(pagingQuerySchema().extend({ message: z.string().max(80).optional() }));

/** The development mailbox: every e-mail the server "sent", newest first, readable in place. */
export const Outbox = () => {
  const { query, setQuery } = useListQuery(outboxQuery);
  const openId = query.message ?? null;
  const mailbox = useMailbox({ page: query.page, pageSize: query.pageSize });

  const columns = useMemo(
    () => [
      column.accessor('subject', {
        header: 'Subject',
        cell: ({ row }) => {
          const open = row.original.id === openId;
          return (
            <button
              type="button"
              onClick={() => setQuery({ message: open ? undefined : row.original.id, page: query.page })}
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
      column.accessor('receivedAt', { header: 'Received', cell: dateTimeCell, meta: { className: 'w-px' } }),
    ],
    [openId, query.page, setQuery],
  );

  if (isApiProblem(mailbox.error) && mailbox.error.status === 404) {
    return (
      <Alert title="No outbox on this server">The outbox only exists while the server runs in development mode; in production, e-mails go out for real.</Alert>
    );
  }

  const openRow = (row: Row<MailboxMessage>) => cn(row.original.id === openId && 'bg-copper-soft/40');
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
        <ListTable
          list={mailbox}
          query={query}
          onQueryChange={({ page }) => setQuery({ page, message: undefined })}
          columns={columns}
          {...outboxText}
          rowClassName={openRow}
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
              <Button variant="ghost" size="sm" onClick={() => setQuery({ message: undefined, page: query.page })}>
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
