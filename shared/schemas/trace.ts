import { z } from 'zod';
import type { BestBeforeState, FiningsDose } from '../cellar/trace.ts';
import type { BatchStatus } from './batches.ts';
import type { KegWhereabouts } from './kegs.ts';

/**
 * Trace and recall: where a batch's beer went. `GET /api/batches/:id/trace` (fixed in API.md) and
 * the trace report over a date range (`GET /api/reports/trace`), on screen, as CSV and as PDF.
 */

export interface TraceFill {
  fillId: string;
  kegId: string;
  code: string;
  filledAt: string;
  volumeLiters: number;
  remainingLiters: number;
  /** The keg still holds this fill (not emptied or returned). */
  holdsBatch: boolean;
  emptiedAt: string | null;
  /** The keg's state now. */
  state: string;
  /** Where the keg is now. */
  whereabouts: KegWhereabouts;
  /** Who has the keg now, while it holds this beer (names only for those who may see holders). */
  holder?: { id: string; name: string } | null;
  dueAt: string | null;
  /** The tap the keg is on now, while it holds this beer. */
  tap?: { id: string; code: string; name: string; position: string | null } | null;
  bestBefore?: string | null;
  bestBeforeState: BestBeforeState | null;
  /** Finings dosed in the transfer that filled this keg. */
  finings: FiningsDose[];
  /** Every member who took the keg out while it held this beer (names as for holder). */
  takenBy: { memberId: string | null; name: string | null; at: string; dueAt: string | null }[];
  /** Every tap the keg was put on while it held this beer. */
  servedOn: { tapId: string; code: string; at: string }[];
}

export interface BatchTrace {
  batch: {
    id: string;
    name: string;
    style: string;
    status: BatchStatus;
    ownerId: string;
    ownerName: string;
    packagedAt: string | null;
    packagedLiters: number | null;
    shelfLifeDays: number | null;
  };
  fills: TraceFill[];
  finings: FiningsDose[];
  allergens: string[];
  vegan: boolean;
  totals: { kegs: number; liters: number; holding: number; withMembers: number; onTaps: number };
}

export const traceReportQuerySchema = z
  .object({
    from: z.iso.date('Give from as a date, e.g. 2026-11-01'),
    to: z.iso.date('Give to as a date, e.g. 2026-11-30'),
    format: z.enum(['json', 'csv', 'pdf']).default('json'),
  })
  .refine((q) => q.from <= q.to, { message: 'from must not be after to', path: ['to'] })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 366 * 86_400_000, { message: 'At most a year at a time', path: ['to'] });
export type TraceReportQuery = z.infer<typeof traceReportQuerySchema>;

export interface TraceReport {
  from: string;
  to: string;
  generatedAt: string;
  /** Each batch with a fill in the range, and only those fills. */
  batches: BatchTrace[];
}
