import { openManualCharges } from './charges.repository.ts';
import { chargeSource, type ChargeContext, type ChargeDraft } from './types.ts';

/** A manual charge or credit as a line of its period's invoice: at its own amount, taxed only when marked taxable. */
export function manualChargeDraft(
  ctx: Pick<ChargeContext, 'first' | 'last'>,
  r: { id: string; member_id: string; description: string; reason: string; amount_cents: number; taxable: boolean },
): ChargeDraft {
  return {
    memberId: r.member_id,
    item: 'manual',
    description: r.description,
    sourceType: 'manual_charge',
    sourceId: r.id,
    sourceLabel: `${r.amount_cents < 0 ? 'Credit' : 'Charge'}: ${r.reason}`,
    serviceFrom: ctx.first,
    serviceTo: ctx.last,
    quantity: 1,
    unit: 'item',
    unitPriceCents: r.amount_cents,
    priceId: null,
    taxable: r.taxable,
  };
}

/** Charges and credits the treasurer added by hand for the period, each with its reason, not yet on an invoice. */
export const manualCharges = chargeSource({
  key: 'manual',
  label: 'Manual charges and credits',
  records: openManualCharges,
  charge: (r, ctx, out) => out.charges.push(manualChargeDraft(ctx, r)),
});
