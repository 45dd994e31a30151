import { equipmentKindSchema } from '../../../shared/schemas/equipment.ts';
import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getEquipmentQueryOptions } from '@/features/equipment/api/get-equipment';
import { equipmentListQuery, getEquipmentListQueryOptions } from '@/features/equipment/api/get-equipment-list';
import { maintenanceListQuery, maintenanceListQueryOptions } from '@/features/equipment/api/inspections';

/** The Cellar list, as its URL says. */
export const cellarPlan: PrefetchPlan = ({ search }) => [getEquipmentListQueryOptions(equipmentListQuery.parse(search))];

/** Inspections failed, past due or due soon, as the URL says. */
export const maintenancePlan: PrefetchPlan = ({ search }) => [maintenanceListQueryOptions(maintenanceListQuery.parse(search))];

/** One item of equipment. */
export const equipmentPlan: PrefetchPlan = ({ params }) => [Boolean(params.equipmentId) && getEquipmentQueryOptions(params.equipmentId ?? '')];

/**
 * The booking calendar's rows: the items of the kind in the URL, fermenters by default. When it opens on
 * one item without a kind, the kind is that item's, so only the item is fetched ahead.
 */
export const calendarPlan: PrefetchPlan = ({ search }) => {
  const focus = search.get('equipmentId');
  const kind = equipmentKindSchema.safeParse(search.get('kind'));
  if (!kind.success && focus) return [getEquipmentQueryOptions(focus)];
  return [
    getEquipmentListQueryOptions({ kind: kind.success ? kind.data : 'fermenter', page: 1, pageSize: 100, sort: 'code', order: 'asc', q: undefined }),
    Boolean(focus) && getEquipmentQueryOptions(focus ?? ''),
  ];
};

export const cellarLoader = prefetchLoader(cellarPlan);
export const maintenanceLoader = prefetchLoader(maintenancePlan);
export const equipmentLoader = prefetchLoader(equipmentPlan);
export const calendarLoader = prefetchLoader(calendarPlan);
