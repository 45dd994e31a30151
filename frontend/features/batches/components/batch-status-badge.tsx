import { batchStatusLabels, type BatchStatus } from '../../../../shared/schemas/batches.ts';
import { Badge, type BadgeTone } from '@/components/ui/badge';

const tones: Record<BatchStatus, BadgeTone> = {
  planned: 'muted',
  fermenting: 'copper',
  conditioning: 'due',
  packaged: 'ready',
  discarded: 'neutral',
};

export const BatchStatusBadge = ({ status }: { status: BatchStatus }) => <Badge tone={tones[status]}>{batchStatusLabels[status]}</Badge>;
