import type { EquipmentKind } from '../../../../shared/schemas/equipment.ts';

/** Every booking query hangs under ['bookings']. */
export const bookingKeys = {
  all: ['bookings'] as const,
  list: (query: object) => [...bookingKeys.all, 'list', query] as const,
  range: (from: string, to: string, kind?: EquipmentKind, version?: number) =>
    version === undefined
      ? ([...bookingKeys.all, 'range', { from, to, kind }] as const)
      : ([...bookingKeys.all, 'range', { from, to, kind }, version] as const),
  rules: () => [...bookingKeys.all, 'rules'] as const,
  fermentersForBatch: (ownerId: string | undefined) => [...bookingKeys.all, 'fermenters-for-batch', ownerId ?? 'me'] as const,
};
