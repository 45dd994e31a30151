import { vesselStateLabels, vesselStates, type VesselState } from '../../../../shared/schemas/equipment.ts';
import { FilterSelect, type FilterSelectProps } from '@/components/list-kit';

type VesselStateFilterProps = Omit<FilterSelectProps<VesselState>, 'label' | 'options' | 'labels'>;

/** A list filter by vessel state (Cellar, kegs), in the order the states are listed everywhere. */
export const VesselStateFilter = (props: VesselStateFilterProps) => <FilterSelect label="State" options={vesselStates} labels={vesselStateLabels} {...props} />;
