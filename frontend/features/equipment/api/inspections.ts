import { useQuery } from '@tanstack/react-query';
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
import { useApiMutation } from '@/lib/api-mutation';

export const recordInspection = (id: string, input: CreateInspectionInput) =>
  api.post<{ inspection: InspectionView }>(`/api/equipment/${encodeURIComponent(id)}/inspections`, input);

/** Inspections and the gas line change what Today, the maintenance list and every item page show. */
const inspectionStale = [equipmentKeys.all, todayKeys.all];

export const useRecordInspection = (id: string) => useApiMutation((input: CreateInspectionInput) => recordInspection(id, input), inspectionStale);

export const useConnectCylinder = (id: string) =>
  useApiMutation(() => api.post<{ cylinder: CylinderView }>(`/api/equipment/${encodeURIComponent(id)}/connect`, {}), inspectionStale);

export const useRefillCylinder = (id: string) =>
  useApiMutation(() => api.post<{ cylinder: CylinderView }>(`/api/equipment/${encodeURIComponent(id)}/refill`, {}), inspectionStale);

/** The maintenance list's state in the URL: the most urgent first. */
export const maintenanceListQuery = defineListQuery(maintenanceListQuerySchema);

export const maintenanceListQueryOptions = (query: MaintenanceListQuery) =>
  pageQueryOptions<MaintenanceItem>(equipmentKeys.maintenance(query), '/api/equipment/maintenance', query);

export function useMaintenanceList(query: MaintenanceListQuery) {
  return useQuery(maintenanceListQueryOptions(query));
}
