import { vesselStateLabels, type VesselState } from '../../../../shared/schemas/equipment.ts';
import { Badge, type BadgeTone } from '@/components/ui/badge';

/** Our colours: hop green for ready, amber for due (needs cleaning), red only for "do not use". */
const tones: Record<VesselState, BadgeTone> = {
  ready: 'ready',
  needs_cleaning: 'due',
  cleaned: 'muted',
  holding: 'neutral',
  out_of_service: 'danger',
};

const hints: Record<VesselState, string> = {
  ready: 'Sanitized within the freshness window',
  needs_cleaning: 'Used or past its freshness window: clean before the next use',
  cleaned: 'Cleaned, not yet sanitized',
  holding: 'Has beer in it',
  out_of_service: 'Do not use',
};

export const StateBadge = ({ state }: { state: VesselState }) => (
  <span title={hints[state]}>
    <Badge tone={tones[state]}>{vesselStateLabels[state]}</Badge>
  </span>
);
