import { useState } from 'react';
import { Link } from 'react-router-dom';
import { bookingStateLabels, type Booking } from '../../../../shared/schemas/booking.ts';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { hiddenHead, ListPager, pagingQuerySchema, TableHead, useListQuery, defineListQuery } from '@/components/list-kit';
import { LoadError } from '@/components/ui/data-table';
import { Dialog } from '@/components/ui/dialog';
import { useNotice } from '@/components/ui/notice';
import { Spinner } from '@/components/ui/spinner';
import { useCancelBooking } from '@/features/bookings/api/cancel-booking';
import { useBookings } from '@/features/bookings/api/get-bookings';
import { subject } from '../../../../shared/permissions/ability.ts';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';
import { queryBooleanSchema } from '../../../../shared/schemas/pagination.ts';

/** The list's page, page size and "include past bookings" live in the URL. */
const bookingsListQuery = defineListQuery(pagingQuerySchema(25).extend({ past: queryBooleanSchema }));

const bookingHead = ['Item', 'From', 'Until', 'Free again', 'Member', 'State', { ...hiddenHead('Actions'), className: 'text-right' }];
const stateTone = { booked: 'copper', in_use: 'neutral', finished: 'muted', cancelled: 'muted' } as const;

export interface BookingsListProps {
  /** Only the signed-in person's bookings ("My bookings"), or everyone's with owners (brewer on duty, admin). */
  mine: boolean;
}

/** Bookings as a list, newest start first, paged on the server, with cancel where allowed. */
export const BookingsList = ({ mine }: BookingsListProps) => {
  const ability = useAppAbility();
  const { query, setQuery } = useListQuery(bookingsListQuery);
  const { page, pageSize } = query;
  const showPast = query.past === true;
  // "Upcoming" starts an hour before the list was opened, fixed for as long as it stays open: a start
  // read from the clock at every render would make every render a new query (and each answer a render).
  const [since] = useState(() => new Date(Math.floor((Date.now() - 3600_000) / 60_000) * 60_000).toISOString());
  const from = showPast ? undefined : since;
  const list = useBookings({ mine, page, pageSize, sort: 'startsAt', order: showPast ? 'desc' : 'asc', includeCancelled: true, ...(from ? { from } : {}) });
  const [cancelling, setCancelling] = useState<Booking | null>(null);
  const notice = useNotice();

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-center gap-3">
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" className="size-4 accent-copper" checked={showPast} onChange={(e) => setQuery({ past: e.target.checked || undefined })} />
          Include past bookings
        </label>
        {list.isFetching ? <Spinner className="size-4" label="Loading" /> : null}
      </div>
      {list.isError && !list.isFetching ? <LoadError what="The bookings" error={list.error} onRetry={() => void list.refetch()} /> : null}
      <div className="md:overflow-x-auto md:rounded-lg md:border md:border-line md:bg-surface">
        <table className="card-table w-full text-sm">
          <caption className="sr-only">{mine ? 'My bookings' : 'All bookings'}</caption>
          <TableHead
            cells={mine ? bookingHead.filter((cell) => cell !== 'Member') : bookingHead}
            className="bg-ground-deep text-left text-xs font-semibold tracking-wide text-ink-muted uppercase"
            cellClassName="px-3 py-2"
          />
          <tbody className="divide-y divide-line">
            {list.data?.items.length === 0 && !list.isError ? (
              <tr>
                <td colSpan={7} className="px-3 py-6 text-center text-ink-muted">
                  {mine ? 'No bookings yet. Pick a free slot on the calendar.' : 'No bookings.'}
                </td>
              </tr>
            ) : null}
            {list.data?.items.map((b) => {
              const canCancel = (b.state === 'booked' || b.state === 'in_use') && ability.can('cancel', subject('Booking', { ownerId: b.ownerId ?? '' }));
              return (
                <tr key={b.id} data-booking={b.id}>
                  <td className="px-3 py-2">
                    <Link to={`/cellar/${b.equipmentId}`} className="font-semibold">
                      {b.equipment.code}
                    </Link>{' '}
                    <span className="text-ink-muted">{b.equipment.name}</span>
                  </td>
                  <td data-label="From" className="px-3 py-2 whitespace-nowrap">
                    {formatDateTime(b.startsAt)}
                  </td>
                  <td data-label="Until" className="px-3 py-2 whitespace-nowrap">
                    {formatDateTime(b.endsAt)}
                  </td>
                  <td data-label="Free again" className="px-3 py-2 whitespace-nowrap text-ink-muted">
                    {formatDateTime(b.blockedUntil)}
                  </td>
                  {!mine ? (
                    <td data-label="Member" className="px-3 py-2">
                      {b.owner ? `${b.owner.name}` : 'Taken'}
                    </td>
                  ) : null}
                  <td data-label="State" className="px-3 py-2">
                    <Badge tone={stateTone[b.state]}>{bookingStateLabels[b.state]}</Badge>
                  </td>
                  <td className="px-3 py-2 text-right">
                    {canCancel ? (
                      <Button
                        variant="secondary"
                        size="sm"
                        onClick={() => setCancelling(b)}
                        aria-label={`Cancel ${b.equipment.code} from ${formatDateTime(b.startsAt)}`}
                      >
                        Cancel
                      </Button>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <ListPager list={list} query={query} onQueryChange={setQuery} noun="bookings" />
      <CancelDialog
        booking={cancelling}
        onClose={() => setCancelling(null)}
        onDone={(b) => (
          setCancelling(null),
          notice.show({ text: `Cancelled ${b.equipment.code} from ${formatDateTime(b.startsAt)}. The slot is free again.` })
        )}
      />
    </div>
  );
};

const CancelDialog = ({ booking, onClose, onDone }: { booking: Booking | null; onClose: () => void; onDone: (b: Booking) => void }) => {
  const mutation = useCancelBooking();
  return (
    <Dialog open={Boolean(booking)} onClose={onClose} busy={mutation.isPending} title="Cancel this booking?">
      {booking ? (
        <div className="flex flex-col gap-4">
          {mutation.isError ? <Alert tone="error">{problemMessage(mutation.error)}</Alert> : null}
          <p>
            {booking.equipment.code} ({booking.equipment.name}) from {formatDateTime(booking.startsAt)} until {formatDateTime(booking.endsAt)}. The slot becomes
            free for other members and
            {booking.owner && !booking.mine ? ` ${booking.owner.name}` : ' you'} will get an e-mail.
          </p>
          <div className="flex justify-end gap-2">
            <Button variant="ghost" onClick={onClose}>
              Keep it
            </Button>
            <Button
              pending={mutation.isPending}
              onClick={async () => {
                try {
                  await mutation.mutateAsync(booking.id);
                  onDone(booking);
                } catch {
                  /* shown above */
                }
              }}
            >
              Cancel booking
            </Button>
          </div>
        </div>
      ) : null}
    </Dialog>
  );
};
