import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Equipment, EquipmentStateChangeInput } from '../../../../shared/schemas/equipment.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';

export { equipmentStateChangeSchema } from '../../../../shared/schemas/equipment.ts';

export const changeEquipmentState = (id: string, input: EquipmentStateChangeInput) =>
  api.post<{ equipment: Equipment }>(`/api/equipment/${encodeURIComponent(id)}/state`, input);

export function useChangeEquipmentState(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: EquipmentStateChangeInput) => changeEquipmentState(id, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: equipmentKeys.all }),
  });
}
