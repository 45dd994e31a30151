import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  maintenanceListQuerySchema,
  type CreateInspectionInput,
  type InspectionView,
  type MaintenanceItem,
  type MaintenanceListQuery,
  type CylinderView,
} from '../../../../shared/schemas/inspections.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { todayKeys } from '@/features/today/api/get-today';
import { api } from '@/lib/api-client';

export const recordInspection = (id: string, input: CreateInspectionInput) =>
  api.post<{ inspection: InspectionView }>(`/api/equipment/${encodeURIComponent(id)}/inspections`, input);

/** Inspections and the gas line change what Today, the maintenance list and every item page show. */
function useInvalidateCellar() {
  const queryClient = useQueryClient();
  return () => Promise.all([queryClient.invalidateQueries({ queryKey: equipmentKeys.all }), queryClient.invalidateQueries({ queryKey: todayKeys.all })]);
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

/** The maintenance list's state in the URL: the most urgent first. */
export const maintenanceListQuery = defineListQuery(maintenanceListQuerySchema);

export const maintenanceListQueryOptions = (query: MaintenanceListQuery) =>
  pageQueryOptions<MaintenanceItem>(equipmentKeys.maintenance(query), '/api/equipment/maintenance', query);

export function useMaintenanceList(query: MaintenanceListQuery) {
  return useQuery(maintenanceListQueryOptions(query));
}
