import type { ChargeDraft, ChargeSource, SourceResult } from './types.ts';
import { chargedMembers } from './window.ts';

/** Charges and credits the treasurer added by hand for the period, each with its reason, not yet on an invoice. */
export const manualCharges: ChargeSource = {
  key: 'manual',
  label: 'Manual charges and credits',
  async derive(db, ctx): Promise<SourceResult> {
    let q = db
      .selectFrom('manual_charge')
      .select(['id', 'member_id', 'description', 'reason', 'amount_cents', 'taxable', 'created_at'])
      .where('period', '=', ctx.period)
      .where('invoice_line_id', 'is', null)
      .orderBy('created_at')
      .orderBy('id');
    if (ctx.memberIds) q = q.where('member_id', 'in', chargedMembers(ctx));
    const rows = await q.execute();
    const charges: ChargeDraft[] = rows.map((r) => ({
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
    }));
    return { charges, problems: [] };
  },
};
