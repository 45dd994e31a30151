import { FilterSelect } from '@/components/list-kit';

const vesselKinds = { fermenter: 'Fermenters', keg: 'Kegs' } as const;
export type VesselKind = keyof typeof vesselKinds;

/** Fermenters, kegs, or both: the kind filter of the sanitation lists. */
export const VesselKindFilter = ({ value, onChange }: { value: VesselKind | undefined; onChange: (kind: VesselKind | undefined) => void }) => (
  <FilterSelect label="Kind" value={value} onChange={onChange} options={vesselKinds} anyLabel="Fermenters and kegs" />
);
