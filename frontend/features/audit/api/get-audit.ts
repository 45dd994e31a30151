import { useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { auditSortFields, type AuditEntry, type AuditQuery } from '../../../../shared/schemas/audit.ts';
import type { UserListQuery } from '../../../../shared/schemas/user.ts';
import { defaultPageSize, maxPageSize } from '../../../../shared/schemas/pagination.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { auditKeys } from '@/features/audit/api/keys';

export type AuditRequest = { [K in keyof AuditQuery]?: AuditQuery[K] | undefined };

const day = z.iso.date();

/** The audit trail screen's state, all of it in the URL: filters, sort and page. Bad values fall back to the defaults. */
export const auditListQuery = defineListQuery(
  z.object({
    page: z.coerce.number().int().min(1).catch(1),
    pageSize: z.coerce.number().int().min(1).max(maxPageSize).catch(defaultPageSize),
    sort: z.enum(auditSortFields).catch('at'),
    order: z.enum(['asc', 'desc']).catch('desc'),
    actorId: z.uuid().optional().catch(undefined),
    subjectType: z.string().max(40).optional().catch(undefined),
    subjectId: z.string().max(80).optional().catch(undefined),
    from: day.optional().catch(undefined),
    to: day.optional().catch(undefined),
  }),
);
export type AuditListQuery = ReturnType<typeof auditListQuery.parse>;

/** A day in the browser's time zone as the instant it starts (`next`: the instant it ends). */
const dayStart = (d: string, next = false) => {
  const t = new Date(`${d}T00:00:00`);
  if (next) t.setDate(t.getDate() + 1);
  return t.toISOString();
};

/** What the screen's state asks of the server: its days as the instants they start and end. */
export const auditTrailRequest = (query: AuditListQuery): AuditRequest => ({
  page: query.page,
  pageSize: query.pageSize,
  sort: query.sort,
  order: query.order,
  actorId: query.actorId,
  subjectType: query.subjectType,
  subjectId: query.subjectId,
  from: query.from ? dayStart(query.from) : undefined,
  to: query.to ? dayStart(query.to, true) : undefined,
});

/** The people the screen's "Person" filter offers. */
export const auditPeopleQuery: UserListQuery = { page: 1, pageSize: 100, sort: 'name', order: 'asc', q: undefined };

export const getAuditTrailQueryOptions = (q: AuditRequest) => pageQueryOptions<AuditEntry>(auditKeys.list(q), '/api/audit', q);

/** One page of the audit trail, as the filters and sort ask (all on the server). */
export const useAuditTrail = (q: AuditRequest) => useQuery(getAuditTrailQueryOptions(q));
