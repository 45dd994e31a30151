import { useQuery } from '@tanstack/react-query';
import { equipmentListQuerySchema, type Equipment, type EquipmentListQuery } from '../../../../shared/schemas/equipment.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { equipmentKeys } from '@/features/equipment/api/keys';

/** The Cellar list's state in the URL. */
export const equipmentListQuery = defineListQuery(equipmentListQuerySchema);

export const getEquipmentListQueryOptions = (query: EquipmentListQuery) => pageQueryOptions<Equipment>(equipmentKeys.list(query), '/api/equipment', query);

export function useEquipmentList(query: EquipmentListQuery, enabled = true) {
  return useQuery({ ...getEquipmentListQueryOptions(query), enabled });
}

/** The URL of a QR label sheet (PDF) for these items. */
export const labelSheetHref = (ids: string[]) => `/api/equipment/labels.pdf?ids=${ids.map(encodeURIComponent).join(',')}`;
