import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/dialog';
import { Spinner } from '@/components/ui/spinner';
import { api, problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

type FeedKind = 'member' | 'rota';
interface CalendarFeed {
  kind: FeedKind;
  url: string | null;
  createdAt: string | null;
}

const feedKeys = { all: ['calendar-feeds'] as const };
const feedText: Record<FeedKind, { title: string; holds: string }> = {
  member: { title: 'My calendar', holds: 'Your bookings, the kegs you have out (when they are due back) and the days your invoices are due.' },
  rota: { title: 'Cellar rota calendar', holds: 'Every booking’s hand-over and cleaning time, transfers due out of fermenters and kegs due back.' },
};

const FeedRow = ({ feed }: { feed: CalendarFeed }) => {
  const queryClient = useQueryClient();
  const inputId = useId();
  const [confirming, setConfirming] = useState(false);
  const [copied, setCopied] = useState(false);
  const renew = useMutation({
    mutationFn: () => api.post<{ feed: CalendarFeed }>('/api/calendar-feeds', { kind: feed.kind }),
    onSuccess: () => {
      setConfirming(false);
      setCopied(false);
      return queryClient.invalidateQueries({ queryKey: feedKeys.all });
    },
  });
  const copy = async () => {
    if (!feed.url) return;
    try {
      await navigator.clipboard.writeText(feed.url);
      setCopied(true);
    } catch {
      // No clipboard (an insecure page, or refused): select the text so it can be copied by hand.
      (document.getElementById(inputId) as HTMLInputElement | null)?.select();
    }
  };
  const text = feedText[feed.kind];
  return (
    <section className="flex flex-col gap-2 rounded-md border border-line bg-surface p-4" aria-label={text.title}>
      <h3 className="text-base">{text.title}</h3>
      <p className="text-sm text-ink-muted">{text.holds} Cancelled bookings drop out. Times are in UTC with the co-op’s time zone named.</p>
      {feed.url ? (
        <>
          <label htmlFor={inputId} className="text-sm font-medium">
            Subscription link (private: anyone with it sees these events)
          </label>
          <input
            id={inputId}
            readOnly
            value={feed.url}
            onFocus={(e) => e.currentTarget.select()}
            className="min-h-11 w-full min-w-0 rounded-md border border-line-strong bg-ground px-3 font-mono text-xs md:min-h-9"
          />
          <div className="flex flex-wrap items-center gap-2">
            <Button variant="secondary" onClick={copy}>
              Copy link
            </Button>
            <Button variant="ghost" onClick={() => setConfirming(true)}>
              New link
            </Button>
            {copied ? (
              <span role="status" className="text-sm text-hop-strong">
                Copied.
              </span>
            ) : null}
            <span className="text-sm text-ink-muted">Made {formatDateTime(feed.createdAt)}</span>
          </div>
        </>
      ) : (
        <div>
          <Button onClick={() => renew.mutate()} pending={renew.isPending}>
            Make a link
          </Button>
        </div>
      )}
      {renew.error && !confirming ? <Alert tone="error">{problemMessage(renew.error)}</Alert> : null}
      <ConfirmDialog
        open={confirming}
        title="Make a new link?"
        confirmLabel="Make a new link"
        pending={renew.isPending}
        error={renew.error ? problemMessage(renew.error) : null}
        onClose={() => setConfirming(false)}
        onConfirm={() => renew.mutate()}
      >
        The current link stops working at once: any calendar subscribed to it stops updating. Subscribe again with the new link.
      </ConfirmDialog>
    </section>
  );
};

/** The profile's calendar links: private iCalendar subscriptions, copied into any calendar program. */
export const CalendarFeedPanel = () => {
  const feeds = useQuery({ queryKey: feedKeys.all, queryFn: ({ signal }) => api.get<{ feeds: CalendarFeed[] }>('/api/calendar-feeds', { signal }) });
  if (feeds.isPending) return <Spinner label="Loading calendar links" />;
  if (feeds.isError) return <Alert tone="error">{problemMessage(feeds.error)}</Alert>;
  if (feeds.data.feeds.length === 0) return null;
  return (
    <div className="flex flex-col gap-3">
      <h2 className="text-lg">Calendar subscription</h2>
      {feeds.data.feeds.map((f) => (
        <FeedRow key={f.kind} feed={f} />
      ))}
    </div>
  );
};
