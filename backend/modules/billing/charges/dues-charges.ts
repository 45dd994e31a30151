import { sql } from 'kysely';
import { periodLabel } from '../../../../shared/billing/dates.ts';
import { priceItemInfo } from '../../../../shared/schemas/billing.ts';
import type { ChargeDraft, ChargeSource, SourceResult } from './types.ts';
import { chargedMembers } from './window.ts';

/**
 * Monthly membership dues: every active account holding the member role that existed by the last
 * day of the period pays the month's dues at the price in effect on the period's first day.
 */
export const duesCharges: ChargeSource = {
  key: 'membership',
  label: 'Membership dues',
  async derive(db, ctx): Promise<SourceResult> {
    let q = db
      .selectFrom('app_user')
      .select(['id', 'name'])
      .where('is_active', '=', true)
      .where(sql<boolean>`'member' = any(roles)`)
      .where(sql<boolean>`(created_at at time zone ${ctx.timeZone})::date <= ${ctx.last}::date`)
      .orderBy('id');
    if (ctx.memberIds) q = q.where('id', 'in', chargedMembers(ctx));
    const members = await q.execute();
    if (members.length === 0) return { charges: [], problems: [] };
    const price = ctx.book.priceOn('membership_month', ctx.first);
    if (!price) return { charges: [], problems: [`No membership dues price on ${ctx.first}.`] };
    const charges: ChargeDraft[] = members.map((m) => ({
      memberId: m.id,
      item: 'membership_month',
      description: priceItemInfo.membership_month.label,
      sourceType: 'membership',
      sourceId: m.id,
      sourceLabel: `Membership, ${periodLabel(ctx.period)}`,
      serviceFrom: ctx.first,
      serviceTo: ctx.last,
      quantity: 1,
      unit: 'month',
      unitPriceCents: price.unitCents,
      priceId: price.id,
      taxable: true,
    }));
    return { charges, problems: [] };
  },
};
