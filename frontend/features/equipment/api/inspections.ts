import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateInspectionInput, InspectionView, MaintenanceItem, MaintenanceListQuery, CylinderView } from '../../../../shared/schemas/inspections.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { equipmentKeys } from '@/features/equipment/api/get-equipment-list';
import { api } from '@/lib/api-client';

export const recordInspection = (id: string, input: CreateInspectionInput) =>
  api.post<{ inspection: InspectionView }>(`/api/equipment/${encodeURIComponent(id)}/inspections`, input);

/** Inspections and the gas line change what Today, the maintenance list and every item page show. */
function useInvalidateCellar() {
  const queryClient = useQueryClient();
  return () => Promise.all([queryClient.invalidateQueries({ queryKey: equipmentKeys.all }), queryClient.invalidateQueries({ queryKey: ['today'] })]);
}

export function useRecordInspection(id: string) {
  const invalidate = useInvalidateCellar();
  return useMutation({ mutationFn: (input: CreateInspectionInput) => recordInspection(id, input), onSuccess: invalidate });
}

export function useConnectCylinder(id: string) {
  const invalidate = useInvalidateCellar();
  return useMutation({ mutationFn: () => api.post<{ cylinder: CylinderView }>(`/api/equipment/${encodeURIComponent(id)}/connect`, {}), onSuccess: invalidate });
}

export function useRefillCylinder(id: string) {
  const invalidate = useInvalidateCellar();
  return useMutation({ mutationFn: () => api.post<{ cylinder: CylinderView }>(`/api/equipment/${encodeURIComponent(id)}/refill`, {}), onSuccess: invalidate });
}

export function useMaintenanceList(query: MaintenanceListQuery) {
  return useQuery({
    queryKey: [...equipmentKeys.all, 'maintenance', query],
    queryFn: ({ signal }) =>
      api.get<Page<MaintenanceItem>>('/api/equipment/maintenance', {
        signal,
        query: {
          page: query.page,
          pageSize: query.pageSize,
          sort: query.sort,
          order: query.order,
          status: query.status,
          equipmentKind: query.equipmentKind,
          q: query.q,
        },
      }),
    placeholderData: keepPreviousData,
  });
}
