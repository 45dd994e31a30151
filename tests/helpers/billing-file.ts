// The billing files' co-op, shared by tests/api/billing-*.test.ts. Hand-worked examples: the co-op is
// the test fixture (six members on the rota of dues since August, 8 % tax) as of 1 December 2026, with
// September and October already billed to its own members on 1 Oct and 1 Nov: two of September's paid
// (one of them partly refunded), one voided, the rest open. Each file adds four members of its own, a
// 60 L and a 120 L fermenter and two kegs, and two price-list changes that took effect in November: tax
// 7.5 % from 1 Nov, and 120 L fermenter-days from 4.00 to 4.50 from 15 Nov. Dues are 15.00 a month, 60 L
// days 2.75 (since 15 Oct), keg-weeks 2.00, late returns 1.00 a day.
import { expect } from 'vitest';
import type { InvoiceDetail } from '../../shared/schemas/billing.ts';
import {
  createBooking,
  createFermenter,
  createInvoice,
  createKeg,
  createKegCheckout,
  createMember,
  createPrice,
  createTaxRate,
} from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext } from './context.ts';

/** The files' clock: 1 December 2026, the day the November run is made. */
export const FILE_NOW = '2026-12-01T10:00:00Z';

/** The fixture's members (member@ … member6@), billed for September and October before the files' runs. */
export const fixtureMembers = ['member', 'member2', 'member3', 'member4', 'member5', 'member6'].map(fixtureUserId);

/** The file's context and its signed-in treasurer, set before the file's tests run. */
export let ctx: TestContext;
export let treasurer: ApiClient;

/**
 * A fresh context with the billing co-op above (`ctx`, `treasurer`). With `billed`, October's and
 * November's runs have been made too (as the runs file makes them).
 */
export function useBillingFile({ billed = false }: { billed?: boolean } = {}) {
  const ids = { a: '', b: '', c: '', d: '' };
  const equipment = { f60: '', f120: '', keg: '', keg2: '' };

  const member = async (name: string, email: string) => (await createMember(ctx.db, { name, email, createdAt: '2026-08-01T09:00:00Z' })).id;

  async function booking(equipmentId: string, ownerId: string, startsAt: string, endsAt: string) {
    await createBooking(ctx.db, { equipmentId, ownerId, startsAt, endsAt, now: FILE_NOW });
  }

  async function invoiceOf(memberId: string, period: string): Promise<InvoiceDetail> {
    const row = await ctx.db.selectFrom('invoice').select('id').where('member_id', '=', memberId).where('period', '=', period).executeTakeFirstOrThrow();
    const res = await treasurer.get(`/api/invoices/${row.id}`);
    expect(res.status).toBe(200);
    return res.body.invoice;
  }

  useTestContext(
    async (created) => {
      ctx = created;
      treasurer = await ctx.signIn('treasurer@example.org');
      const brewer = await ctx.signIn('brewer@example.org');

      // September and October for the fixture's members, each issued on the 1st of the next month
      // (dues only: 15.00 + 8 % = 16.20 each).
      const september: Record<string, string> = {};
      for (const memberId of fixtureMembers) {
        september[memberId] = (await createInvoice(ctx.db, { memberId, period: '2026-09', today: '2026-10-01' })).id;
      }
      for (const memberId of fixtureMembers) await createInvoice(ctx.db, { memberId, period: '2026-10', today: '2026-11-01' });
      // Maren (member@) and Tobias (member2@) paid September; Maren was refunded 5.00 of it; Bram's (member6@) was voided.
      for (const key of ['member', 'member2']) {
        const paid = await treasurer.post(`/api/invoices/${september[fixtureUserId(key)]}/payments`, {
          amountCents: 1620,
          method: 'bank_transfer',
          receivedOn: '2026-10-12',
        });
        expect(paid.status).toBe(201);
      }
      const refund = await treasurer.post(`/api/invoices/${september[fixtureUserId('member')]}/refunds`, {
        amountCents: 500,
        reason: 'Dues waived for a week away',
        refundMethod: 'bank_transfer',
      });
      expect(refund.status).toBe(201);
      const voided = await treasurer.post(`/api/invoices/${september[fixtureUserId('member6')]}/void`, { reason: 'Joined in October, not August' });
      expect(voided.status).toBe(200);

      ids.a = await member('Test Member Alder', 'alder.test@example.org');
      ids.b = await member('Test Member Birch', 'birch.test@example.org');
      ids.c = await member('Test Member Cedar', 'cedar.test@example.org');
      ids.d = await member('Test Member Damson', 'damson.test@example.org');
      equipment.f60 = (await createFermenter(ctx.db, { code: 'F-90', name: 'Test fermenter F-90', capacityLiters: 60, state: 'ready' })).id;
      equipment.f120 = (await createFermenter(ctx.db, { code: 'F-91', name: 'Test fermenter F-91', capacityLiters: 120, state: 'ready' })).id;
      equipment.keg = (await createKeg(ctx.db, { code: 'K-900', name: 'Test keg K-900', state: 'ready' })).id;
      equipment.keg2 = (await createKeg(ctx.db, { code: 'K-901', name: 'Test keg K-901', state: 'ready' })).id;

      // The price list as it stood: both changes were entered before they took effect.
      await createTaxRate(ctx.db, { rateBp: 750, label: 'VAT', effectiveFrom: '2026-11-01' });
      await createPrice(ctx.db, { item: 'fermenter_day', bandMaxLiters: 120, unitCents: 450, effectiveFrom: '2026-11-15' });

      // A: a 60 L fermenter from 28 Oct to 5 Nov, across the month boundary.
      await booking(equipment.f60, ids.a, '2026-10-28T10:00:00Z', '2026-11-05T10:00:00Z');
      // B: a 120 L fermenter from 10 to 20 Nov, across the price change on the 15th.
      await booking(equipment.f120, ids.b, '2026-11-10T09:00:00Z', '2026-11-20T09:00:00Z');
      // D: a keg out 3 Nov, due 17 Nov, back 20 Nov (three days late); another out 25 Nov, due 28 Nov, still out.
      await createKegCheckout(ctx.db, { kegId: equipment.keg, memberId: ids.d, at: '2026-11-03T10:00:00Z', dueAt: '2026-11-17T18:00:00Z' });
      ctx.clock.set('2026-11-20T15:00:00Z'); // the brewer on duty takes it back that afternoon
      const back = await brewer.post(`/api/kegs/${equipment.keg}/return`, {});
      ctx.clock.set(FILE_NOW);
      expect(back.status).toBe(200);
      await createKegCheckout(ctx.db, { kegId: equipment.keg2, memberId: ids.d, at: '2026-11-25T10:00:00Z', dueAt: '2026-11-28T18:00:00Z' });
      if (billed) {
        for (const period of ['2026-10', '2026-11']) expect((await treasurer.post('/api/invoice-runs', { period })).status).toBe(201);
      }
    },
    {},
    { now: FILE_NOW },
  );
  return { ids, equipment, invoiceOf };
}
