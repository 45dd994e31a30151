import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';
import type { EquipmentKind } from './equipment.ts';
import { equipmentKindSchema } from './equipment.ts';
import { queryBooleanSchema, sortableListQuerySchema } from './pagination.ts';

export const bookingStateLabels = labelsOf({ booked: 'Booked', in_use: 'In use', finished: 'Finished', cancelled: 'Cancelled' });
export const [bookingStates, bookingStateSchema] = closedSet(bookingStateLabels);
export type BookingState = z.infer<typeof bookingStateSchema>;

/** An ISO 8601 time with its offset, as the API speaks them. */
export const isoTimeSchema = z.iso.datetime({ offset: true, message: 'Use an ISO 8601 time with offset, like 2026-12-07T09:00:00Z' });

/**
 * Body of `POST /api/bookings`, and the booking form's schema. `ownerId` lets an admin book for a
 * member; a member may leave it out or give their own id.
 */
export const createBookingSchema = z
  .object({
    equipmentId: z.uuid('Pick an item'),
    startsAt: isoTimeSchema,
    endsAt: isoTimeSchema,
    batchId: z.uuid('Pick a batch').nullable().optional(),
    ownerId: z.uuid('Pick a member').optional(),
    notes: z.string().trim().max(500, 'Keep notes under 500 characters').optional(),
  })
  .refine((b) => Date.parse(b.endsAt) > Date.parse(b.startsAt), { path: ['endsAt'], message: 'The end must be after the start' });
export type CreateBookingInput = z.infer<typeof createBookingSchema>;

export const bookingSortFields = ['startsAt', 'endsAt', 'createdAt', 'state'] as const;
export type BookingSortField = (typeof bookingSortFields)[number];

/** `GET /api/bookings?from&to&equipmentId&kind&mine=1&state&includeCancelled&page&pageSize&sort&order`. */
export const bookingListQuerySchema = sortableListQuerySchema(bookingSortFields, 'startsAt')
  .extend({
    from: isoTimeSchema.optional(),
    to: isoTimeSchema.optional(),
    equipmentId: z.uuid().optional(),
    kind: equipmentKindSchema.optional(),
    ownerId: z.uuid().optional(),
    mine: z
      .enum(['1', '0', 'true', 'false'])
      .transform((v) => v === '1' || v === 'true')
      .optional(),
    state: bookingStateSchema.optional(),
    includeCancelled: queryBooleanSchema,
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) > Date.parse(q.from), { path: ['to'], message: '`to` must be after `from`' });
export type BookingListQuery = z.infer<typeof bookingListQuerySchema>;

/**
 * A booking as the API returns it. `owner` (and the other personal fields) appear only to those who
 * may see who holds it: its owner, the brewer on duty, the treasurer and the admin. Everyone else
 * sees the slot as taken.
 */
export interface Booking {
  id: string;
  equipmentId: string;
  equipment: { code: string; name: string; kind: EquipmentKind };
  startsAt: string;
  endsAt: string;
  /** End plus the cleaning buffer: the item is not free again before this. */
  blockedUntil: string;
  state: BookingState;
  mine: boolean;
  createdAt: string;
  cancelledAt: string | null;
  ownerId?: string;
  owner?: { id: string; name: string; email: string };
  batchId?: string | null;
  notes?: string;
}
