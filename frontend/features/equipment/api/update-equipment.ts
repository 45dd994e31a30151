import type { Equipment, UpdateEquipmentInput } from '../../../../shared/schemas/equipment.ts';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export const updateEquipment = (id: string, input: UpdateEquipmentInput) =>
  api.patch<{ equipment: Equipment }>(`/api/equipment/${encodeURIComponent(id)}`, input);

export const useUpdateEquipment = (id: string) => useApiMutation((input: UpdateEquipmentInput) => updateEquipment(id, input), [equipmentKeys.all]);
