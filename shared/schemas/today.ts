import type { AgeingBucket, InvoiceRun, MemberBalance } from './billing.ts';
import type { MaintenanceItem } from './inspections.ts';

/** Kegs still holding beer past or near their best-before (within `nearDays`), soonest first. */
export interface TodayBestBefore {
  total: number;
  nearDays: number;
  items: {
    kegId: string;
    code: string;
    batchId: string;
    batchName: string;
    bestBefore: string;
    state: 'near' | 'past';
    whereabouts: string;
    tapCode: string | null;
    memberName: string | null;
  }[];
}

/** `GET /api/today`: what needs doing today, one section per thing the person may see. */
export interface TodayMemberSection {
  bookings: { id: string; equipmentId: string; equipmentCode: string; equipmentName: string; startsAt: string; endsAt: string; state: string }[];
  batches: { id: string; name: string; style: string; status: string; latestSg: number | null; latestAt: string | null }[];
  kegs: { id: string; code: string; dueAt: string | null; overdue: boolean }[];
  /** Kegs they have out that are past or near best-before. */
  bestBefore: TodayBestBefore;
  balance: MemberBalance | null;
}

export interface TodayCellarSection {
  needsCleaning: { total: number; items: { id: string; code: string; name: string; state: string; nextBookingAt: string | null }[] };
  overdueKegs: { total: number; items: { id: string; code: string; memberName: string | null; dueAt: string }[] };
  transfersDue: { batchId: string; batchName: string; ownerName: string; fermenterId: string; fermenterCode: string; bookingEndsAt: string }[];
  handovers: { bookingId: string; equipmentId: string; equipmentCode: string; startsAt: string; equipmentState: string; ready: boolean }[];
  /** Kegs anywhere that are past or near best-before. */
  bestBefore: TodayBestBefore;
  /** Kegs and cylinders whose inspection failed, is past due or due soon (most urgent first). */
  inspectionsDue?: { total: number; items: MaintenanceItem[] };
}

export interface TodayMoneySection {
  currency: string;
  unpaid: { count: number; totalCents: number };
  overdue: { count: number; totalCents: number };
  drafts: number;
  ageing: Record<AgeingBucket, number>;
  lastRun: InvoiceRun | null;
  suggestedPeriod: string;
}

export interface Today {
  generatedAt: string;
  member?: TodayMemberSection;
  cellar?: TodayCellarSection;
  money?: TodayMoneySection;
}
