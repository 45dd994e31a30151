import { useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { vesselStates } from '../../../../shared/schemas/equipment.ts';
import {
  sanitationCycleListQuerySchema,
  sanitationStatusQuerySchema,
  type CreateSanitationCycleInput,
  type SanitationCycleListQuery,
  type SanitationCycleView,
  type VesselSanitationStatus,
} from '../../../../shared/schemas/sanitation.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { kegKeys } from '@/features/kegs/api/keys';
import { sanitationKeys } from '@/features/sanitation/api/keys';
import { api, buildUrl } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export interface VesselStatusQuery {
  kind?: 'fermenter' | 'keg' | undefined;
  state?: string | undefined;
  q?: string | undefined;
  sort?: 'code' | 'state' | 'freshUntil' | 'lastCycleAt';
  order?: 'asc' | 'desc';
  page?: number;
  pageSize?: number;
}

/** The sanitation log's state in the URL: newest cycle first. */
export const cycleListQuery = defineListQuery(sanitationCycleListQuerySchema);

/** The vessels list's state in the URL: the ones that need cleaning, unless `state=any` or another state. */
export const vesselListQuery = defineListQuery(
  sanitationStatusQuerySchema.extend({
    state: z.enum([...vesselStates, 'any']).default('needs_cleaning'),
    pageSize: z.coerce.number().int().min(1).max(100).default(25),
  }),
);

export const vesselStatusQueryOptions = (q: VesselStatusQuery) =>
  pageQueryOptions<VesselSanitationStatus>(sanitationKeys.status(q), '/api/sanitation-status', q);

export const useVesselStatus = (q: VesselStatusQuery, enabled = true) => useQuery({ ...vesselStatusQueryOptions(q), enabled });

export const cyclesQueryOptions = (q: Partial<SanitationCycleListQuery>) =>
  pageQueryOptions<SanitationCycleView>(sanitationKeys.cycles(q), '/api/sanitation-cycles', q);

export const useCycles = (q: Partial<SanitationCycleListQuery>, enabled = true) => useQuery({ ...cyclesQueryOptions(q), enabled });

interface CycleResult {
  cycle: SanitationCycleView;
  equipment: { id: string; code: string; state: string };
}

/** Everything that shows a vessel's state reads again after a cycle. */
const cycleStale = [sanitationKeys.all, equipmentKeys.all, kegKeys.all];

export const useRecordCycle = () => useApiMutation((input: CreateSanitationCycleInput) => api.post<CycleResult>('/api/sanitation-cycles', input), cycleStale);

export const useContinueCycle = () =>
  useApiMutation(
    ({ cycleId, steps }: { cycleId: string; steps: CreateSanitationCycleInput['steps'] }) =>
      api.post<CycleResult>(`/api/sanitation-cycles/${encodeURIComponent(cycleId)}/steps`, { steps }),
    cycleStale,
  );

export const auditReportHref = (q: { from: string; to: string; kind?: string | undefined; equipmentId?: string[] | undefined }) =>
  buildUrl('/api/reports/sanitation-audit.pdf', {
    from: q.from,
    to: q.to,
    kind: q.kind,
    equipmentId: q.equipmentId?.length ? q.equipmentId.join(',') : undefined,
  });
