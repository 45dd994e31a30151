import { useQuery } from '@tanstack/react-query';
import type { CreateEquipmentInput, Equipment, EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export const createEquipment = (input: CreateEquipmentInput) => api.post<{ equipment: Equipment }>('/api/equipment', input);

/** Adds an item to the registry (admin); every equipment list and page refetches. */
export const useCreateEquipment = () => useApiMutation(createEquipment, [equipmentKeys.all]);

export const getNextEquipmentCode = (kind: EquipmentKind, signal?: AbortSignal) =>
  api.get<{ kind: EquipmentKind; code: string }>('/api/equipment/next-code', { query: { kind }, ...(signal ? { signal } : {}) });

/** The next free label code for a kind (a hint: the server's unique code is the guarantee). */
export function useNextEquipmentCode(kind: EquipmentKind, enabled = true) {
  return useQuery({
    queryKey: equipmentKeys.nextCode(kind),
    queryFn: ({ signal }) => getNextEquipmentCode(kind, signal),
    enabled,
    staleTime: 0,
  });
}
