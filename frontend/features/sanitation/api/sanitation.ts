import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import type {
  CreateSanitationCycleInput,
  SanitationCycleListQuery,
  SanitationCycleView,
  VesselSanitationStatus,
} from '../../../../shared/schemas/sanitation.ts';
import { api, buildUrl } from '@/lib/api-client';

export interface VesselStatusQuery {
  kind?: 'fermenter' | 'keg' | undefined;
  state?: string | undefined;
  q?: string | undefined;
  sort?: 'code' | 'state' | 'freshUntil' | 'lastCycleAt';
  order?: 'asc' | 'desc';
  page?: number;
  pageSize?: number;
}

export const sanitationKeys = {
  all: ['sanitation'] as const,
  status: (q: VesselStatusQuery) => [...sanitationKeys.all, 'status', q] as const,
  cycles: (q: Partial<SanitationCycleListQuery>) => [...sanitationKeys.all, 'cycles', q] as const,
  cycle: (id: string) => [...sanitationKeys.all, 'cycle', id] as const,
};

export const vesselStatusQueryOptions = (q: VesselStatusQuery) =>
  queryOptions({
    queryKey: sanitationKeys.status(q),
    queryFn: ({ signal }) => api.get<Page<VesselSanitationStatus>>('/api/sanitation-status', { query: { ...q }, signal }),
    placeholderData: keepPreviousData,
  });

export const useVesselStatus = (q: VesselStatusQuery, enabled = true) => useQuery({ ...vesselStatusQueryOptions(q), enabled });

export const cyclesQueryOptions = (q: Partial<SanitationCycleListQuery>) =>
  queryOptions({
    queryKey: sanitationKeys.cycles(q),
    queryFn: ({ signal }) => api.get<Page<SanitationCycleView>>('/api/sanitation-cycles', { query: { ...q }, signal }),
    placeholderData: keepPreviousData,
  });

export const useCycles = (q: Partial<SanitationCycleListQuery>, enabled = true) => useQuery({ ...cyclesQueryOptions(q), enabled });

interface CycleResult {
  cycle: SanitationCycleView;
  equipment: { id: string; code: string; state: string };
}

/** Everything that shows a vessel's state reads again after a cycle. */
function useInvalidateCellar() {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: sanitationKeys.all }),
      queryClient.invalidateQueries({ queryKey: ['equipment'] }),
      queryClient.invalidateQueries({ queryKey: ['kegs'] }),
    ]);
}

export function useRecordCycle() {
  const invalidate = useInvalidateCellar();
  return useMutation({
    mutationFn: (input: CreateSanitationCycleInput) => api.post<CycleResult>('/api/sanitation-cycles', input),
    onSuccess: () => invalidate(),
  });
}

export function useContinueCycle() {
  const invalidate = useInvalidateCellar();
  return useMutation({
    mutationFn: ({ cycleId, steps }: { cycleId: string; steps: CreateSanitationCycleInput['steps'] }) =>
      api.post<CycleResult>(`/api/sanitation-cycles/${encodeURIComponent(cycleId)}/steps`, { steps }),
    onSuccess: () => invalidate(),
  });
}

export const auditReportHref = (q: { from: string; to: string; kind?: string | undefined; equipmentId?: string[] | undefined }) =>
  buildUrl('/api/reports/sanitation-audit.pdf', {
    from: q.from,
    to: q.to,
    kind: q.kind,
    equipmentId: q.equipmentId?.length ? q.equipmentId.join(',') : undefined,
  });
