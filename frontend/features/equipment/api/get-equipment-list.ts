import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Equipment, EquipmentListQuery } from '../../../../shared/schemas/equipment.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';

export const equipmentKeys = {
  all: ['equipment'] as const,
  list: (query: EquipmentListQuery) => [...equipmentKeys.all, 'list', query] as const,
  detail: (id: string) => [...equipmentKeys.all, 'detail', id] as const,
};

export const getEquipmentList = (query: EquipmentListQuery, signal?: AbortSignal) =>
  api.get<Page<Equipment>>('/api/equipment', { query: { ...query }, ...(signal ? { signal } : {}) });

export const getEquipmentListQueryOptions = (query: EquipmentListQuery) =>
  queryOptions({
    queryKey: equipmentKeys.list(query),
    queryFn: ({ signal }) => getEquipmentList(query, signal),
    placeholderData: keepPreviousData,
  });

export function useEquipmentList(query: EquipmentListQuery, enabled = true) {
  return useQuery({ ...getEquipmentListQueryOptions(query), enabled });
}

/** The URL of a QR label sheet (PDF) for these items. */
export const labelSheetHref = (ids: string[]) => `/api/equipment/labels.pdf?ids=${ids.map(encodeURIComponent).join(',')}`;
