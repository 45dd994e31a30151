import { useQuery } from '@tanstack/react-query';
import type { AuditEntry, AuditQuery } from '../../../../shared/schemas/audit.ts';
import { pageQueryOptions } from '@/components/list-kit';
import { auditKeys } from '@/features/audit/api/keys';

export type AuditRequest = { [K in keyof AuditQuery]?: AuditQuery[K] | undefined };

/** One page of the audit trail, as the filters and sort ask (all on the server). */
export const useAuditTrail = (q: AuditRequest) => useQuery(pageQueryOptions<AuditEntry>(auditKeys.list(q), '/api/audit', q));
