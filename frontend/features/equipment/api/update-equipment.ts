import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Equipment, UpdateEquipmentInput } from '../../../../shared/schemas/equipment.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';

export const updateEquipment = (id: string, input: UpdateEquipmentInput) =>
  api.patch<{ equipment: Equipment }>(`/api/equipment/${encodeURIComponent(id)}`, input);

export function useUpdateEquipment(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateEquipmentInput) => updateEquipment(id, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: equipmentKeys.all }),
  });
}
