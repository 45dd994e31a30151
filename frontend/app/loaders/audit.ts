import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { auditListQuery, auditPeopleQuery, auditTrailRequest, getAuditTrailQueryOptions } from '@/features/audit/api/get-audit';
import { getUsersQueryOptions } from '@/features/users/api/get-users';

/** The audit trail, as its URL says, and the people its filter offers; only for whoever may read the trail. */
export const auditPlan: PrefetchPlan = ({ search, ability }) =>
  ability.can('read', 'AuditLog') ? [getAuditTrailQueryOptions(auditTrailRequest(auditListQuery.parse(search))), getUsersQueryOptions(auditPeopleQuery)] : [];

export const auditLoader = prefetchLoader(auditPlan);
