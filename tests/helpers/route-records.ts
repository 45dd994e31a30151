import { randomUUID } from 'node:crypto';
import { recordPayment, voidInvoice } from '../../backend/modules/billing/invoices.service.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import {
  createBatch,
  createBooking,
  createFermenter,
  createInvoice,
  createKeg,
  createManualCharge,
  createPrice,
  createSanitationCycle,
  createTaxRate,
  DAY,
  fillKeg,
  HOUR,
} from '../../db/factories/index.ts';
import type { ApiClient, TestContext } from './context.ts';

/**
 * The records a route's path parameters point at, made with the factories for the route tests
 * (the permission matrix and the write fuzzer): one per kind of `:id`, owned by a given member
 * where the kind has an owner. `params` fills the route's parameters; `marks` are strings of the
 * owner's data that must never reach anyone the record is hidden from.
 */
export type RecordKind =
  | 'user'
  | 'equipment'
  | 'booking'
  | 'batch'
  | 'reading'
  | 'importProgress'
  | 'invoice'
  | 'overpayment'
  | 'creditNote'
  | 'invoiceRun'
  | 'price'
  | 'taxRate'
  | 'manualCharge'
  | 'cycle'
  | 'transfer'
  | 'keg'
  | 'plan'
  | 'setting'
  | 'token';

/** Kinds whose records belong to one member (a member sees their own, not another's). */
export const ownedKinds = new Set<RecordKind>([
  'user',
  'booking',
  'batch',
  'reading',
  'importProgress',
  'invoice',
  'overpayment',
  'creditNote',
  'manualCharge',
  'keg',
  'plan',
]);

export interface RouteRecord {
  params: Record<string, string>;
  marks: string[];
}

export interface Owner {
  key: string;
  id: string;
  email: string;
  name: string;
}

export const fixtureMember = (key: 'member' | 'member2'): Owner => ({
  key,
  id: fixtureUserId(key),
  email: `${key}@example.org`,
  name: key === 'member' ? 'Maren Holloway' : 'Tobias Quill',
});

/** Makes route records on a test context; `brewer` records what only the API makes (carbonation plans). */
export function routeRecords(ctx: TestContext, brewer: ApiClient) {
  let seq = 0;
  // Invoice periods counted back from July 2026 (before the fixture's members joined, so only the
  // manual charge made for the invoice is billed); each member has one invoice per period.
  let periodBack = 0;
  const nextPeriod = () => {
    const d = new Date(Date.UTC(2026, 6 - periodBack++, 1));
    return d.toISOString().slice(0, 7);
  };
  const now = () => ctx.clock.now();
  const at = (ms: number) => new Date(now().getTime() + ms);
  const today = () => now().toISOString().slice(0, 10);
  const dayAhead = (days: number) =>
    at(days * DAY)
      .toISOString()
      .slice(0, 10);
  const mark = (what: string) => `${what}-mark-${++seq}-${randomUUID().slice(0, 8)}`;
  const treasurerId = fixtureUserId('treasurer');

  async function invoiceFor(owner: Owner, issue = true) {
    const description = mark('charge');
    const period = nextPeriod();
    await createManualCharge(ctx.db, { memberId: owner.id, period, amountCents: 4321, description, createdBy: treasurerId });
    const invoice = await createInvoice(ctx.db, { memberId: owner.id, period, today: today(), issue, actorId: treasurerId });
    return { invoice, description };
  }

  async function filledKeg(owner: Owner) {
    const keg = await createKeg(ctx.db);
    const name = mark('batch');
    const batch = await createBatch(ctx.db, {
      ownerId: owner.id,
      name,
      readings: [
        { takenAt: at(-9 * DAY), value: 1.05 },
        { takenAt: at(-3 * DAY), value: 1.011 },
      ],
    });
    await fillKeg(ctx.db, { kegId: keg.id, at: at(-2 * DAY), batchId: batch.id, ownerId: owner.id });
    return { kegId: keg.id, batchName: name };
  }

  async function make(kind: RecordKind, owner: Owner): Promise<RouteRecord> {
    const who = [owner.email, owner.name];
    switch (kind) {
      case 'user':
        return { params: { id: owner.id }, marks: [owner.email] };
      case 'equipment': {
        const f = await createFermenter(ctx.db);
        return { params: { id: f.id }, marks: [] };
      }
      case 'booking': {
        const notes = mark('booking');
        const f = await createFermenter(ctx.db);
        const b = await createBooking(ctx.db, { ownerId: owner.id, equipmentId: f.id, startsAt: at(3 * DAY), endsAt: at(6 * DAY), now: now(), notes });
        return { params: { id: b.id }, marks: [...who, notes] };
      }
      case 'batch':
      case 'reading':
      case 'importProgress': {
        const name = mark('batch');
        const b = await createBatch(ctx.db, {
          ownerId: owner.id,
          name,
          notes: mark('notes'),
          readings: [
            { takenAt: at(-3 * DAY), value: 1.052 },
            { takenAt: at(-DAY), value: 1.03 },
          ],
        });
        return { params: { id: b.id, readingId: b.readings[0]!.id, progressId: randomUUID() }, marks: [...who, name] };
      }
      case 'invoice': {
        const { invoice, description } = await invoiceFor(owner);
        return { params: { id: invoice.id }, marks: [...who, description] };
      }
      case 'overpayment': {
        // An online payment of the whole invoice and 5.00 more: the excess is kept to refund.
        const { invoice, description } = await invoiceFor(owner);
        const due = await ctx.db.selectFrom('invoice').select(['total_cents', 'paid_cents']).where('id', '=', invoice.id).executeTakeFirstOrThrow();
        const owed = due.total_cents - due.paid_cents;
        const payment = await ctx.db
          .transaction()
          .execute((trx) =>
            recordPayment(
              trx,
              invoice.id,
              { amountCents: owed + 500, overpaidCents: 500, method: 'online', receivedOn: today(), reference: mark('payment') },
              null,
              now(),
            ),
          );
        return { params: { id: payment.id }, marks: [...who, description] };
      }
      case 'creditNote': {
        const { invoice, description } = await invoiceFor(owner);
        await ctx.db
          .transaction()
          .execute((trx) => voidInvoice(trx, invoice.id, { reason: 'Billed by mistake', refundMethod: null }, today(), treasurerId, now()));
        const note = await ctx.db.selectFrom('credit_note').select('id').where('invoice_id', '=', invoice.id).executeTakeFirstOrThrow();
        return { params: { id: note.id }, marks: [...who, description] };
      }
      case 'invoiceRun': {
        const run = await ctx.db
          .insertInto('invoice_run')
          .values({ period: nextPeriod(), issued: false, run_by: treasurerId })
          .returning('id')
          .executeTakeFirstOrThrow();
        return { params: { id: run.id }, marks: [] };
      }
      case 'price': {
        const p = await createPrice(ctx.db, { item: 'keg_week', unitCents: 200 + seq, effectiveFrom: dayAhead(30 + ++seq), createdBy: treasurerId });
        return { params: { id: p.id }, marks: [] };
      }
      case 'taxRate': {
        const t = await createTaxRate(ctx.db, { rateBp: 900, effectiveFrom: dayAhead(30 + ++seq) });
        return { params: { id: t.id }, marks: [] };
      }
      case 'manualCharge': {
        const description = mark('charge');
        const c = await createManualCharge(ctx.db, { memberId: owner.id, period: '2026-11', amountCents: 777, description, createdBy: treasurerId });
        return { params: { id: c.id }, marks: [...who, description] };
      }
      case 'cycle': {
        const f = await createFermenter(ctx.db);
        const c = await createSanitationCycle(ctx.db, { equipmentId: f.id, readyAt: at(-HOUR), until: 'cleaned' });
        return { params: { id: c.id }, marks: [] };
      }
      case 'transfer': {
        const keg = await createKeg(ctx.db);
        const { transfer } = await fillKeg(ctx.db, { kegId: keg.id, at: at(-DAY), ownerId: owner.id });
        return { params: { id: transfer.id }, marks: [] };
      }
      case 'keg': {
        const { kegId, batchName } = await filledKeg(owner);
        return { params: { id: kegId }, marks: [...who, batchName] };
      }
      case 'plan': {
        const { kegId, batchName } = await filledKeg(owner);
        const res = await brewer.post('/api/carbonation-plans', { kegId, targetVolumes: 2.4, method: 'set_and_hold' });
        if (res.status !== 201) throw new Error(`could not plan carbonation: ${res.status} ${JSON.stringify(res.body)}`);
        return { params: { id: res.body.plan.id }, marks: [...who, batchName] };
      }
      case 'setting':
        return { params: { key: 'booking_rules' }, marks: [] };
      case 'token':
        return { params: { token: 'no-such-invitation-token' }, marks: [] };
    }
  }

  return { make, invoiceFor, filledKeg };
}

/** The route's path with its parameters filled in from the record. */
export function fillPath(path: string, record: RouteRecord | undefined): string {
  return path.replace(/:(\w+)/g, (_m, name: string) => {
    const v = record?.params[name];
    if (v === undefined) throw new Error(`no value for :${name} in ${path}`);
    return encodeURIComponent(v);
  });
}
