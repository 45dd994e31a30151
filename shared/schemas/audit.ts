import { z } from 'zod';
import { sortableListQuerySchema } from './pagination.ts';

/** The columns the audit trail sorts by (an allowlist the route maps to SQL). */
export const auditSortFields = ['at', 'action', 'subjectType', 'actor'] as const;

/**
 * `GET /api/audit`: paged and sorted on the server (newest first by default), filtered by person
 * (`actorId`), record (`subjectType`, `subjectId`, either or both) and a time range (`from` inclusive,
 * `to` exclusive; ISO 8601 times with an offset).
 */
export const auditQuerySchema = sortableListQuerySchema(auditSortFields, 'at').extend({
  subjectType: z.string().trim().max(40).optional(),
  subjectId: z.string().trim().max(80).optional(),
  actorId: z.uuid().optional(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

/** One changed field of an audit row: what it was and what it became (null where not recorded). */
export interface AuditChange {
  field: string;
  before: unknown;
  after: unknown;
}

export interface AuditEntry {
  id: string;
  action: string;
  subjectType: string;
  subjectId: string | null;
  detail: unknown;
  at: string;
  actorId: string | null;
  actorName: string | null;
  changes: AuditChange[];
}

/** The record types the trail names, for its filter. */
export const auditSubjectTypes = [
  'Batch',
  'BillingProfile',
  'Booking',
  'CarbonationPlan',
  'Charge',
  'Equipment',
  'Invoice',
  'InvoiceRun',
  'Keg',
  'Price',
  'SanitationCycle',
  'Setting',
  'TaxRate',
  'Transfer',
  'User',
] as const;

const isPlain = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const same = (a: unknown, b: unknown) => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

/** Nested objects as dotted paths (`rules.maxDays`); arrays and plain values stay whole. */
function flatten(v: unknown, prefix = '', out: Record<string, unknown> = {}, depth = 0): Record<string, unknown> {
  if (isPlain(v) && depth < 4) {
    for (const [k, x] of Object.entries(v)) flatten(x, prefix ? `${prefix}.${k}` : k, out, depth + 1);
    if (prefix && Object.keys(v).length === 0) out[prefix] = v;
  } else out[prefix || 'value'] = v;
  return out;
}

/**
 * The changed fields an audit row records, read from its detail as the services write it:
 * `{ before, after }` (every field that differs), `{ from, to }` (one change), otherwise each field
 * is what the action set (no "before").
 */
export function auditChanges(detail: unknown): AuditChange[] {
  if (!isPlain(detail)) return [];
  if ('before' in detail && 'after' in detail) {
    const before = flatten(detail.before);
    const after = flatten(detail.after);
    const fields = [...new Set([...Object.keys(before), ...Object.keys(after)])];
    return fields.filter((f) => !same(before[f], after[f])).map((field) => ({ field, before: before[field] ?? null, after: after[field] ?? null }));
  }
  const changes: AuditChange[] = [];
  if ('from' in detail && 'to' in detail && !isPlain(detail.from) && !isPlain(detail.to)) {
    changes.push({ field: 'from → to', before: detail.from ?? null, after: detail.to ?? null });
  }
  for (const [k, v] of Object.entries(flatten(Object.fromEntries(Object.entries(detail).filter(([k]) => k !== 'from' && k !== 'to'))))) {
    changes.push({ field: k, before: null, after: v });
  }
  return changes;
}
