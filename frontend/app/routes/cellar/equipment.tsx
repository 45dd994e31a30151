import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { bookingStateLabels } from '../../../../shared/schemas/booking.ts';
import { equipmentKindLabels, vesselStateLabels, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { PageHeader, QueryFallback } from '@/components/layouts/page-header';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { parentPages } from '@/config/paths';
import { useEquipment } from '@/features/equipment/api/get-equipment';
import { labelSheetHref } from '@/features/equipment/api/get-equipment-list';
import { EquipmentEditDialog } from '@/features/equipment/components/equipment-edit-dialog';
import { InspectionsPanel, ratingText } from '@/features/equipment/components/inspections-panel';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { StateChangeDialog } from '@/features/equipment/components/state-change-dialog';
import { attributeQuantities, formatAttribute } from '@/features/equipment/equipment-form';
import { VesselCellarActions } from '@/features/equipment/components/vessel-actions';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { formatDateTime } from '@/utils/format';

const attributeLabels: Record<string, string> = {
  style: 'Shape',
  hasValve: 'Bottom valve',
  serial: 'Serial',
  lock: 'Lock',
  position: 'Position',
  lineLengthM: 'Line length',
  lineInsideDiameterMm: 'Line inside diameter',
  riseM: 'Rise to faucet',
  coldRoomTempC: 'Cold room',
  sizeKg: 'Size (CO2)',
  fillPercent: 'Fill',
  hydroTestDue: 'Hydrostatic test due',
  ratedPressureKpa: 'Rated working pressure',
};

/** An item's attributes in the order its form asks for them (the database keeps its own key order). */
const attributeEntries = (item: Equipment) => {
  const order = Object.keys(attributeQuantities[item.kind]);
  const rank = (key: string) => (order.includes(key) ? order.indexOf(key) : order.length);
  return Object.entries(item.attributes).sort(([a], [b]) => rank(a) - rank(b));
};

const cautionFor = (item: Equipment): string | null => {
  if (item.kind === 'keg') return 'Never exceed the keg’s or the regulator’s rated pressure and keep the pressure-relief valve working.';
  if (item.kind === 'co2_cylinder')
    return 'Keep the cylinder chained upright; never exceed a regulator’s rated pressure. CO2 displaces air in closed rooms: ventilate and keep the CO2 alarm on.';
  if (item.kind === 'tap') return 'The cold room is closed: CO2 displaces air. Keep it ventilated and heed the CO2 alarm.';
  return null;
};

/** One item's page (what a QR label opens): facts, state with its history, and its upcoming bookings. */
const EquipmentRoute = () => {
  const { equipmentId = '' } = useParams();
  const detail = useEquipment(equipmentId);
  const ability = useAppAbility();
  const units = useUnits();
  const [changing, setChanging] = useState(false);
  const [editing, setEditing] = useState(false);
  useDocumentTitle(detail.data ? `${detail.data.equipment.code} · Cellar` : 'Cellar');

  if (detail.isPending || detail.isError) return <QueryFallback query={detail} what="item" />;
  const { equipment: item, history, upcomingBookings } = detail.data;
  const caution = cautionFor(item);
  return (
    <div className="flex flex-col gap-5">
      <PageHeader
        parent={parentPages.cellar}
        title={item.code}
        badge={<StateBadge state={item.state} />}
        intro={[item.name, equipmentKindLabels[item.kind], item.capacityLiters ? units.volume(item.capacityLiters) : ''].filter(Boolean).join(' · ')}
        actions={
          <div className="flex flex-wrap gap-2">
            <VesselCellarActions item={item} />
            {ability.can('create', 'Booking') && item.state !== 'out_of_service' ? (
              <Link
                to={`/bookings?equipmentId=${item.id}`}
                className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-medium text-white no-underline hover:bg-copper-strong hover:no-underline md:min-h-9"
              >
                Book it
              </Link>
            ) : null}
            {ability.can('update', 'Equipment') ? (
              <Button variant="secondary" onClick={() => setChanging(true)}>
                Change state
              </Button>
            ) : null}
            {canOnEvery(ability, 'manage', 'Equipment') ? (
              <Button variant="secondary" onClick={() => setEditing(true)}>
                Edit details
              </Button>
            ) : null}
            <a
              href={labelSheetHref([item.id])}
              target="_blank"
              rel="noreferrer"
              className="inline-flex min-h-11 items-center rounded-md px-3 text-sm md:min-h-9"
            >
              Label (PDF)
            </a>
          </div>
        }
      />

      {caution ? (
        <Alert tone="info" title="Safety">
          {caution} Local codes and licensed practice come first.
        </Alert>
      ) : null}

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(0,1.4fr)]">
        <section className="rounded-lg border border-line bg-surface p-4">
          <h2 className="text-base">Details</h2>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
            {attributeEntries(item).map(([key, value]) => (
              <div key={key} className="contents">
                <dt className="text-ink-muted">{attributeLabels[key] ?? key}</dt>
                <dd>{key === 'ratedPressureKpa' && typeof value === 'number' ? ratingText(value) : formatAttribute(item.kind, key, value, units.units)}</dd>
              </div>
            ))}
            <dt className="text-ink-muted">Notes</dt>
            <dd>{item.notes || '—'}</dd>
          </dl>
        </section>

        <section className="rounded-lg border border-line bg-surface p-4">
          <h2 className="text-base">Upcoming bookings</h2>
          {upcomingBookings.length === 0 ? (
            <p className="mt-2 text-sm text-ink-muted">Nothing booked ahead.</p>
          ) : (
            <ul className="mt-2 divide-y divide-line text-sm">
              {upcomingBookings.map((b) => (
                <li key={b.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                  <span>
                    {formatDateTime(b.startsAt)} – {formatDateTime(b.endsAt)}
                    <span className="block text-xs text-ink-muted">Kept free for cleaning until {formatDateTime(b.blockedUntil)}</span>
                  </span>
                  <span className="flex items-center gap-2">
                    <span>{b.mine ? 'You' : (b.owner?.name ?? 'Taken')}</span>
                    <Badge tone={b.state === 'in_use' ? 'copper' : 'neutral'}>{bookingStateLabels[b.state]}</Badge>
                  </span>
                </li>
              ))}
            </ul>
          )}
        </section>
      </div>

      <InspectionsPanel item={item} inspections={detail.data.inspections} inspectionsDue={detail.data.inspectionsDue} cylinder={detail.data.cylinder} />

      <section className="rounded-lg border border-line bg-surface p-4">
        <h2 className="text-base">History</h2>
        <table className="card-table mt-2 w-full text-sm">
          <caption className="sr-only">State changes of {item.code}, newest first</caption>
          <thead>
            <tr className="text-left text-xs text-ink-muted uppercase">
              <th className="py-1.5 pr-3">When</th>
              <th className="py-1.5 pr-3">Change</th>
              <th className="py-1.5 pr-3">Why</th>
              <th className="py-1.5">Who</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {history.map((h) => (
              <tr key={h.id}>
                <td data-label="When" className="py-1.5 pr-3 whitespace-nowrap">
                  {formatDateTime(h.at)}
                </td>
                <td data-label="Change" className="py-1.5 pr-3 whitespace-nowrap">
                  {h.fromState ? `${vesselStateLabels[h.fromState]} → ` : ''}
                  {vesselStateLabels[h.toState]}
                </td>
                <td data-label="Why" className="py-1.5 pr-3">
                  {h.reason}
                </td>
                <td data-label="Who" className="py-1.5 text-ink-muted">
                  {h.actor?.name ?? '—'}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <StateChangeDialog item={changing ? item : null} onClose={() => setChanging(false)} />
      {canOnEvery(ability, 'manage', 'Equipment') ? <EquipmentEditDialog item={item} open={editing} onClose={() => setEditing(false)} /> : null}
    </div>
  );
};

export default EquipmentRoute;
