import { invoiceStatusLabels, type InvoiceStatus } from '../../../../shared/schemas/billing.ts';
import { Badge, type BadgeTone } from '@/components/ui/badge';

const tones: Record<InvoiceStatus, BadgeTone> = { draft: 'muted', issued: 'neutral', paid: 'ready', void: 'muted' };

/** Paid is hop green, overdue amber; void and draft stay quiet. */
export const InvoiceStatusBadge = ({ status, overdue = false, partPaid = false }: { status: InvoiceStatus; overdue?: boolean; partPaid?: boolean }) => {
  if (status === 'issued' && overdue) return <Badge tone="due">Overdue</Badge>;
  if (status === 'issued' && partPaid) return <Badge tone="copper">Part paid</Badge>;
  return <Badge tone={tones[status]}>{invoiceStatusLabels[status]}</Badge>;
};
