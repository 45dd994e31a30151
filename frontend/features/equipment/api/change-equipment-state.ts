import type { Equipment, EquipmentStateChangeInput } from '../../../../shared/schemas/equipment.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export { equipmentStateChangeSchema } from '../../../../shared/schemas/equipment.ts';

export const changeEquipmentState = (id: string, input: EquipmentStateChangeInput) =>
  api.post<{ equipment: Equipment }>(`/api/equipment/${encodeURIComponent(id)}/state`, input);

export const useChangeEquipmentState = (id: string) =>
  useApiMutation((input: EquipmentStateChangeInput) => changeEquipmentState(id, input), [equipmentKeys.all]);
