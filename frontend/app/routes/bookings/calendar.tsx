import { useCallback, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import { equipmentKindLabels, equipmentKinds, equipmentKindSchema, type EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/input';
import { BookingAgenda } from '@/features/bookings/components/booking-agenda';
import { BookingCalendar } from '@/features/bookings/components/booking-calendar';
import { BookingFormDialog, type BookingDraft } from '@/features/bookings/components/booking-form-dialog';
import { useEquipment } from '@/features/equipment/api/get-equipment';
import { useEquipmentList } from '@/features/equipment/api/get-equipment-list';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useMediaQuery } from '@/hooks/use-media-query';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

/** How long a booking made from a single click lasts, by kind (the form lets you change it). */
const defaultDays: Record<EquipmentKind, number> = { fermenter: 14, keg: 21, tap: 14, co2_cylinder: 7 };
const HOUR = 3600_000;

/** A click on a day (midnight) means that day at 10:00; a time in the past moves to the next whole hour. */
function startFrom(date: Date): Date {
  const d = new Date(date);
  if (d.getHours() === 0 && d.getMinutes() === 0) d.setHours(10);
  const soon = new Date(Math.ceil((Date.now() + 5 * 60_000) / HOUR) * HOUR);
  return d < soon ? soon : d;
}

const BookingsCalendarRoute = () => {
  useDocumentTitle('Bookings');
  const ability = useAppAbility();
  const [params, setParams] = useSearchParams();
  const focus = params.get('equipmentId');
  const focused = useEquipment(focus ?? '');
  const kindParam = equipmentKindSchema.safeParse(params.get('kind'));
  const kind: EquipmentKind = kindParam.success ? kindParam.data : focus && focused.data ? focused.data.equipment.kind : 'fermenter';
  const items = useEquipmentList({ kind, page: 1, pageSize: 100, sort: 'code', order: 'asc', q: undefined });
  const [draft, setDraft] = useState<BookingDraft | null>(null);
  const [version, setVersion] = useState(0);
  const [booked, setBooked] = useState<Booking | null>(null);
  const [error, setError] = useState<string | null>(null);
  const canBook = ability.can('create', 'Booking');
  // Below the small breakpoint a week list replaces the timeline; on a touch screen one taps, not clicks.
  const phone = useMediaQuery('(max-width: 639.98px)');
  const touch = useMediaQuery('(pointer: coarse)');
  const onError = useCallback((e: unknown) => setError(problemMessage(e)), []);
  const pick = ({ equipmentId, start, end }: { equipmentId: string; start: Date; end?: Date }) => {
    if (!canBook) return;
    const startsAt = startFrom(start);
    let endsAt: Date;
    if (end && end.getTime() - start.getTime() > 24 * HOUR) {
      endsAt = new Date(end.getTime() - 24 * HOUR);
      endsAt.setHours(startsAt.getHours(), 0, 0, 0);
    } else {
      const item = items.data?.items.find((i) => i.id === equipmentId);
      endsAt = new Date(startsAt.getTime() + defaultDays[item?.kind ?? kind] * 24 * HOUR);
    }
    setBooked(null);
    setDraft({ equipmentId, startsAt: startsAt.toISOString(), endsAt: endsAt.toISOString() });
  };

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <label className="flex w-56 flex-col gap-1 text-xs font-medium text-ink-muted">
          Show
          <Select
            value={kind}
            onChange={(e) => {
              const next = new URLSearchParams(params);
              next.set('kind', e.target.value);
              next.delete('equipmentId');
              setParams(next, { replace: true });
            }}
          >
            {equipmentKinds.map((k) => (
              <option key={k} value={k}>
                {equipmentKindLabels[k]}s
              </option>
            ))}
          </Select>
        </label>
        <p className="flex flex-wrap items-center gap-3 text-xs text-ink-muted" aria-label="Legend">
          <span className="inline-flex items-center gap-1.5">
            <span className="inline-block size-3 rounded-sm bg-copper" /> Yours
          </span>
          <span className="inline-flex items-center gap-1.5">
            <span className="inline-block size-3 rounded-sm bg-ink-muted" /> Taken
          </span>
          <span className="inline-flex items-center gap-1.5">
            <span className="inline-block size-3 rounded-sm border border-due/40 bg-due-soft" /> Kept free for cleaning
          </span>
        </p>
      </div>
      {canBook ? (
        phone ? (
          <p className="text-sm text-ink-muted">
            Tap Book on an item to book it from its first free time in the week shown; you can change the dates before you confirm.
          </p>
        ) : (
          <div className="flex flex-wrap items-center justify-between gap-2">
            <p className="text-sm text-ink-muted">
              {touch ? 'Tap' : 'Click'} a free day in an item’s row (or drag across days) to book it, or book by dates with the form.
            </p>
            <Button
              size="sm"
              variant="secondary"
              disabled={!items.data?.items.length}
              onClick={() => {
                const first = items.data?.items[0];
                if (first) pick({ equipmentId: first.id, start: new Date() });
              }}
            >
              Book by dates
            </Button>
          </div>
        )
      ) : null}
      {booked ? (
        <Alert tone="success" title="Booked">
          {booked.equipment.code} is yours from {formatDateTime(booked.startsAt)} until {formatDateTime(booked.endsAt)}. A confirmation with a calendar file is
          on its way by e-mail. <Link to="/bookings/mine">My bookings</Link>
        </Alert>
      ) : null}
      {error ? (
        <Alert tone="error" title="The calendar could not load bookings">
          {error}{' '}
          <Button size="sm" variant="secondary" onClick={() => (setError(null), setVersion((v) => v + 1))}>
            Try again
          </Button>
        </Alert>
      ) : null}
      {phone ? (
        <BookingAgenda items={items.data?.items ?? []} kind={kind} version={version} canBook={canBook} onError={onError} onPick={pick} />
      ) : (
        <div className="overflow-x-auto rounded-lg border border-line bg-surface p-2">
          <BookingCalendar items={items.data?.items ?? []} kind={kind} version={version} onError={onError} onPick={pick} />
        </div>
      )}
      <BookingFormDialog
        draft={draft}
        items={items.data?.items ?? []}
        onClose={() => setDraft(null)}
        onBooked={(b) => {
          setDraft(null);
          setBooked(b);
          setVersion((v) => v + 1);
        }}
      />
    </div>
  );
};

export default BookingsCalendarRoute;
