import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import type { Equipment, EquipmentStateChange } from '../../../../shared/schemas/equipment.ts';
import type { CylinderView, InspectionDue, InspectionView } from '../../../../shared/schemas/inspections.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';

export interface EquipmentDetail {
  equipment: Equipment;
  history: EquipmentStateChange[];
  upcomingBookings: Booking[];
  inspections: InspectionView[];
  inspectionsDue: InspectionDue[];
  cylinder?: CylinderView;
}

export const getEquipment = (id: string, signal?: AbortSignal) =>
  api.get<EquipmentDetail>(`/api/equipment/${encodeURIComponent(id)}`, signal ? { signal } : {});

export const getEquipmentQueryOptions = (id: string) => queryOptions({ queryKey: equipmentKeys.detail(id), queryFn: ({ signal }) => getEquipment(id, signal) });

export function useEquipment(id: string, enabled = Boolean(id)) {
  return useQuery({ ...getEquipmentQueryOptions(id), enabled });
}
