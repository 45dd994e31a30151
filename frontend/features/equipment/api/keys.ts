import type { EquipmentKind } from '../../../../shared/schemas/equipment.ts';

/** Every equipment query hangs under ['equipment']; a change to an item invalidates it all. */
export const equipmentKeys = {
  all: ['equipment'] as const,
  list: (query: object) => [...equipmentKeys.all, 'list', query] as const,
  detail: (id: string) => [...equipmentKeys.all, 'detail', id] as const,
  maintenance: (query: object) => [...equipmentKeys.all, 'maintenance', query] as const,
  nextCode: (kind: EquipmentKind) => [...equipmentKeys.all, 'next-code', kind] as const,
};
