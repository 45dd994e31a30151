import { keepPreviousData, useQuery } from '@tanstack/react-query';
import type { AuditEntry, AuditQuery } from '../../../../shared/schemas/audit.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';

export type AuditRequest = { [K in keyof AuditQuery]?: AuditQuery[K] | undefined };

/** One page of the audit trail, as the filters and sort ask (all on the server). */
export const useAuditTrail = (q: AuditRequest) =>
  useQuery({
    queryKey: ['audit', q],
    queryFn: ({ signal }) => api.get<Page<AuditEntry>>('/api/audit', { query: { ...q }, signal }),
    placeholderData: keepPreviousData,
  });
