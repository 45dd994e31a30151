import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';
import { queryBooleanSchema, searchTextSchema, sortableListQuerySchema } from './pagination.ts';
import type { BestBeforeState, FiningsDose } from '../cellar/trace.ts';
import { isoDateTimeSchema } from './sanitation.ts';

/** Where a keg is (PRODUCT.md "Keg whereabouts"). */
export const kegWhereaboutsLabels = labelsOf({ cellar: 'Cellar', cold_room: 'Cold room', with_member: 'With a member', missing: 'Missing' });
export const [kegWhereabouts, kegWhereaboutsSchema] = closedSet(kegWhereaboutsLabels);
export type KegWhereabouts = z.infer<typeof kegWhereaboutsSchema>;

const note = z.string().trim().max(500, 'Keep the note under 500 characters').optional();

/** Body of `POST /api/kegs/:id/check-out`. */
export const kegCheckOutSchema = z.object({
  memberId: z.uuid('Pick a member'),
  dueAt: isoDateTimeSchema,
  note,
});
export type KegCheckOutInput = z.infer<typeof kegCheckOutSchema>;

/** Body of `POST /api/kegs/:id/return`. */
export const kegReturnSchema = z.object({ note }).default({});
export type KegReturnInput = z.infer<typeof kegReturnSchema>;

/** Body of `POST /api/kegs/:id/move`: within the co-op (check-out and return have their own routes). */
export const kegMoveSchema = z
  .object({
    to: z.enum(['cellar', 'cold_room', 'missing']),
    /** In the cold room: the tap position the keg is connected to, or none. */
    tapId: z.uuid().nullable().optional(),
    note,
  })
  .refine((b) => !b.tapId || b.to === 'cold_room', { message: 'Only a keg in the cold room can be on a tap', path: ['tapId'] });
export type KegMoveInput = z.infer<typeof kegMoveSchema>;

/**
 * Body of `POST /api/kegs/:id/empty`: served to the last drop, or `dumped` (poured away: spoiled,
 * infected, flat), which the monthly production report counts as a loss.
 */
export const kegEmptySchema = z.object({ note, dumped: z.boolean().optional() }).default({});

/** Body of `POST /api/kegs/:id/undo`: the return, emptying or dump to undo (its `undo.id`); without it, the keg's latest. */
export const kegUndoSchema = z.object({ actionId: z.uuid().optional() }).default({});

/** Offered with the answer to a return, an emptying or a dump: undo it until `until` (the app's clock). */
export interface KegUndoOfferView {
  id: string;
  action: 'returned' | 'emptied' | 'dumped';
  until: string;
}

/** Body of `PATCH /api/kegs/:id/level`: how much the co-op thinks is left. */
export const kegLevelSchema = z.object({ remainingLiters: z.number().min(0, 'At least 0 L').max(1000) });
export type KegLevelInput = z.infer<typeof kegLevelSchema>;

export const kegSortFields = ['code', 'state', 'whereabouts', 'dueAt', 'remainingLiters'] as const;

/** `GET /api/kegs?page&pageSize&sort&order&whereabouts&state&overdue&memberId&q`. */
export const kegListQuerySchema = sortableListQuerySchema(kegSortFields, 'code').extend({
  whereabouts: kegWhereaboutsSchema.optional(),
  state: z.enum(['ready', 'needs_cleaning', 'cleaned', 'holding', 'out_of_service']).optional(),
  overdue: queryBooleanSchema,
  memberId: z.uuid().optional(),
  q: searchTextSchema,
});
export type KegListQuery = z.infer<typeof kegListQuerySchema>;

export const kegHistoryQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(100),
});

export interface KegContents {
  fillId: string;
  batchId: string;
  batchName: string;
  style: string;
  volumeLiters: number;
  remainingLiters: number;
  og: number | null;
  fg: number | null;
  abv: number | null;
  filledAt: string;
  /** Stored when the keg was filled: filled_at plus the batch's shelf life. */
  bestBefore: string | null;
  bestBeforeState: BestBeforeState | null;
  /** Dissolved oxygen measured in this keg at the fill, ppb (where the co-op has a meter). */
  dissolvedOxygenPpb: number | null;
  /** Finings dosed when this keg was filled. */
  finings: FiningsDose[];
  /** The batch's allergen notes and what the finings add. */
  allergens: string[];
  vegan: boolean;
}

export interface KegCarbonation {
  planId: string;
  method: 'set_and_hold' | 'fast_start';
  targetVolumes: number;
  servingPressureKpa: number;
  fastPressureKpa: number | null;
  lowerPressureAt: string | null;
  pressureLoweredAt: string | null;
  readyAt: string;
}

export interface KegView {
  id: string;
  code: string;
  name: string;
  capacityLiters: number | null;
  lock: string | null;
  serial: string | null;
  /** Effective state: a lapsed freshness window reads as needs_cleaning. */
  state: 'ready' | 'needs_cleaning' | 'cleaned' | 'holding' | 'out_of_service';
  whereabouts: KegWhereabouts;
  since: string | null;
  tap: { id: string; code: string; name: string; position: string | null } | null;
  /** Who has it (only for those who may see it). */
  member: { id: string; name: string } | null;
  checkedOutAt: string | null;
  dueAt: string | null;
  overdue: boolean;
  /** When the holder was last reminded to bring it back (during this check-out), if ever. */
  lastRemindedAt: string | null;
  contents: KegContents | null;
  carbonation: KegCarbonation | null;
  freshUntil: string | null;
}

export interface KegHistoryEntry {
  at: string;
  kind: 'movement' | 'state' | 'sanitation' | 'fill' | 'emptied' | 'carbonation';
  title: string;
  detail: string;
  actor: string | null;
  refId: string | null;
}

export interface TapBoardEntry {
  id: string;
  code: string;
  name: string;
  position: string | null;
  lineLengthM: number | null;
  lineInsideDiameterMm: number | null;
  /** vinyl, polyethylene, barrier or stainless; null when not recorded (taken as vinyl). */
  lineMaterial: string | null;
  /** The tap's own measured or maker's resistance, kPa/m; null to use the line type's default. */
  lineResistanceKpaPerM: number | null;
  riseM: number | null;
  coldRoomTempC: number | null;
  state: string;
  /** Something is on this tap. */
  taken: boolean;
  /** The keg on it, when the viewer may see that keg. */
  keg: KegView | null;
}
