import { priceLine } from '../../../../shared/billing/money.ts';
import type { ChargePreviewLine, LineItem } from '../../../../shared/schemas/billing.ts';
import type { Database } from '../../../db/database.ts';
import { bookingCharges } from './booking-charges.ts';
import { fermenterCleaningCharges, finingsCharges, kegFillCharges, kegHoldCharges, lateKegCharges } from './cellar-charges.ts';
import { duesCharges } from './dues-charges.ts';
import { manualCharges } from './manual-charges.ts';
import type { ChargeContext, ChargeDraft, ChargeSource } from './types.ts';

/**
 * Every kind of record that gives rise to charges, one function each. A capability whose records
 * are billed adds its source here.
 */
export const chargeSources: ChargeSource[] = [
  duesCharges,
  bookingCharges,
  kegHoldCharges,
  lateKegCharges,
  kegFillCharges,
  finingsCharges,
  fermenterCleaningCharges,
  manualCharges,
];

export interface PricedCharge extends ChargeDraft, ChargePreviewLine {}

const itemOrder: LineItem[] = [
  'membership_month',
  'fermenter_day',
  'tap_week',
  'keg_week',
  'cleaning',
  'co2_fill',
  'co2_kg',
  'finings_dose',
  'late_keg_day',
  'manual',
];

/** Puts tax on a derived charge: the rate in effect on its first day of use, rounded per line (shared/billing/money.ts). */
export function priceCharge(ctx: ChargeContext, c: ChargeDraft): PricedCharge {
  const taxRateBp = c.taxable ? (ctx.book.taxOn(c.serviceFrom)?.rateBp ?? 0) : 0;
  const { amountCents, taxCents } = priceLine({ quantity: c.quantity, unitPriceCents: c.unitPriceCents, taxRateBp });
  return { ...c, amountCents, taxRateBp, taxCents };
}

export async function deriveCharges(
  db: Database,
  ctx: ChargeContext,
): Promise<{ byMember: Map<string, PricedCharge[]>; problems: string[]; sources: string[] }> {
  const results = [];
  for (const source of chargeSources) results.push(await source.derive(db, ctx));
  const byMember = new Map<string, PricedCharge[]>();
  for (const r of results) {
    for (const c of r.charges) {
      const list = byMember.get(c.memberId) ?? [];
      list.push(priceCharge(ctx, c));
      byMember.set(c.memberId, list);
    }
  }
  for (const list of byMember.values()) {
    list.sort(
      (a, b) =>
        itemOrder.indexOf(a.item) - itemOrder.indexOf(b.item) || a.serviceFrom.localeCompare(b.serviceFrom) || a.sourceLabel.localeCompare(b.sourceLabel),
    );
  }
  return { byMember, problems: [...new Set(results.flatMap((r) => r.problems))], sources: chargeSources.map((s) => s.label) };
}
