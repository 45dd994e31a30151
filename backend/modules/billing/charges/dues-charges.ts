import { periodLabel } from '../../../../shared/billing/dates.ts';
import { duesMembers } from './charges.repository.ts';
import { chargeAtPrice, chargeSource, spanCharge } from './types.ts';

/**
 * Monthly membership dues: every active account holding the member role that existed by the last
 * day of the period pays the month's dues at the price in effect on the period's first day.
 */
export const duesCharges = chargeSource({
  key: 'membership',
  label: 'Membership dues',
  records: duesMembers,
  charge(m, ctx, out) {
    const missing = `No membership dues price on ${ctx.first}.`;
    chargeAtPrice(ctx, out, { item: 'membership_month', day: ctx.first, missing }, (price) =>
      spanCharge(
        'membership_month',
        price,
        { from: ctx.first, to: ctx.next, quantity: 1, unit: 'month' },
        {
          memberId: m.id,
          sourceType: 'membership',
          sourceId: m.id,
          sourceLabel: `Membership, ${periodLabel(ctx.period)}`,
        },
      ),
    );
  },
});
