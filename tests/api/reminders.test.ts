import { describe, expect, it } from 'vitest';
import { createInvoice, createKeg, createKegCheckout, createMember, DAY, HOUR } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

// Reminders for overdue invoices and kegs: queued e-mails, recorded with who, whom and when, and
// quiet for 24 hours by the app's clock (a second one within that time is refused with 409).

let ctx: TestContext;
let treasurer: ApiClient, brewer: ApiClient, member: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [treasurer, brewer, member] = await signInAs(ctx, 'treasurer', 'brewer', 'member');
});

const now = () => ctx.clock.now();
const daysAgo = (d: number) => new Date(now().getTime() - d * DAY).toISOString().slice(0, 10);
/** The month before the one `day` falls in, as a billing period. */
const monthBefore = (day: string) => new Date(Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 2, 1)).toISOString().slice(0, 7);

/** A new member with an invoice issued 70 days before the clock's day: long past its due day, unpaid. */
async function overdueInvoice(name: string) {
  const m = await createMember(ctx.db, { name });
  const issued = daysAgo(70);
  const inv = await createInvoice(ctx.db, { memberId: m.id, period: monthBefore(issued), today: issued });
  return { member: m, invoice: inv };
}

const remindersOf = (column: 'invoice_id' | 'keg_id', id: string) =>
  ctx.db.selectFrom('reminder').selectAll().where(column, '=', id).orderBy('sent_at').execute();
const mailsTo = async (to: string, subject: RegExp) =>
  (await ctx.deps.pool.query<{ subject: string }>('select subject from dev_mail_message where $1 = any(mail_to)', [to.toLowerCase()])).rows.filter((m) =>
    subject.test(m.subject),
  );
const queuedTo = async (to: string) => {
  const r = await ctx.deps.pool.query(`select count(*)::int as n from pgboss.job where name = 'email.send' and data->>'to' = $1`, [to]);
  return r.rows[0].n as number;
};

describe('invoice reminders', () => {
  it('sends a queued reminder for an overdue invoice, records it and shows it as last reminded', async () => {
    const { member: m, invoice } = await overdueInvoice('Reminded Ruth');
    const res = await treasurer.post(`/api/invoices/${invoice.id}/reminders`, {});
    expect(res.status).toBe(201);
    expect(res.body.reminder).toMatchObject({ kind: 'invoice', targetId: invoice.id, sentTo: m.email, sentAt: expect.any(String) });
    const mail = await ctx.waitForMail(m.email, /^Reminder: invoice/);
    expect(mail.subject).toContain(invoice.number!);
    expect(mail.text_body).toMatch(/still to pay/);
    const [row] = await remindersOf('invoice_id', invoice.id);
    expect(row).toMatchObject({ kind: 'invoice', member_id: m.id, sent_to: m.email, sent_by: treasurer.user.id });
    // Recorded at the app's clock, not the machine's.
    expect(Math.abs(row!.sent_at.getTime() - new Date(res.body.reminder.sentAt).getTime())).toBe(0);
    expect(Math.abs(row!.sent_at.getTime() - now().getTime())).toBeLessThan(60_000);
    const detail = await treasurer.get(`/api/invoices/${invoice.id}`);
    expect(detail.body.invoice.lastRemindedAt).toBe(res.body.reminder.sentAt);
    const audit = await ctx.db.selectFrom('audit_log').select('action').where('subject_id', '=', invoice.id).where('action', '=', 'reminded').execute();
    expect(audit).toHaveLength(1);
  });

  it('refuses a second reminder within 24 hours by the app clock (409), and sends one after', async () => {
    const { member: m, invoice } = await overdueInvoice('Twice Tamsin');
    expect((await treasurer.post(`/api/invoices/${invoice.id}/reminders`, {})).status).toBe(201);
    ctx.clock.advance(23 * HOUR);
    const again = await treasurer.post(`/api/invoices/${invoice.id}/reminders`, {});
    expect(again.status).toBe(409);
    expect(again.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(again.body).toMatchObject({ code: 'reminded_recently', lastRemindedAt: expect.any(String), remindAgainAfter: expect.any(String) });
    expect(await remindersOf('invoice_id', invoice.id)).toHaveLength(1);
    ctx.clock.advance(2 * HOUR);
    expect((await treasurer.post(`/api/invoices/${invoice.id}/reminders`, {})).status).toBe(201);
    expect(await remindersOf('invoice_id', invoice.id)).toHaveLength(2);
    expect(await queuedTo(m.email)).toBe(2);
  });

  it('sends one reminder when the button is pressed twice at once', async () => {
    const { member: m, invoice } = await overdueInvoice('Double Dora');
    const results = await Promise.all(Array.from({ length: 6 }, () => treasurer.post(`/api/invoices/${invoice.id}/reminders`, {})));
    const statuses = results.map((r) => r.status).sort();
    expect(statuses).toEqual([201, 409, 409, 409, 409, 409]);
    expect(await remindersOf('invoice_id', invoice.id)).toHaveLength(1);
    expect(await queuedTo(m.email)).toBe(1);
  });

  it('the database refuses two reminders of one invoice within the quiet time, however they are written', async () => {
    const { member: m, invoice } = await overdueInvoice('Constraint Cora');
    const row = { kind: 'invoice' as const, invoice_id: invoice.id, member_id: m.id, sent_to: m.email, sent_by: null };
    const at = now();
    await ctx.db
      .insertInto('reminder')
      .values({ ...row, sent_at: at, quiet_until: new Date(at.getTime() + DAY) })
      .execute();
    await expect(
      ctx.db
        .insertInto('reminder')
        .values({ ...row, sent_at: new Date(at.getTime() + HOUR), quiet_until: new Date(at.getTime() + 25 * HOUR) })
        .execute(),
    ).rejects.toMatchObject({
      code: '23P01',
    });
  });

  it('refuses an invoice that is not overdue (409) and a paid one, changing nothing', async () => {
    const m = await createMember(ctx.db, { name: 'Punctual Pia' });
    const today = now().toISOString().slice(0, 10);
    const fresh = await createInvoice(ctx.db, { memberId: m.id, period: monthBefore(today), today });
    const res = await treasurer.post(`/api/invoices/${fresh.id}/reminders`, {});
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('not_overdue');
    expect(await remindersOf('invoice_id', fresh.id)).toHaveLength(0);
  });

  it('is for the books only: a member (even for their own) and the rota are refused', async () => {
    const own = await createInvoice(ctx.db, { memberId: member.user.id, period: monthBefore(daysAgo(70)), today: daysAgo(70) });
    expect((await member.post(`/api/invoices/${own.id}/reminders`, {})).status).toBe(403);
    expect((await brewer.post(`/api/invoices/${own.id}/reminders`, {})).status).toBe(403);
    expect((await treasurer.post('/api/invoices/not-an-id/reminders', {})).status).toBe(404);
    expect(await remindersOf('invoice_id', own.id)).toHaveLength(0);
  });

  it('counts and reminds all overdue invoices at once, skipping those reminded in the last 24 hours', async () => {
    const a = await overdueInvoice('Bulk Bea');
    const b = await overdueInvoice('Bulk Bo');
    expect((await treasurer.post(`/api/invoices/${a.invoice.id}/reminders`, {})).status).toBe(201);
    const count = await treasurer.get('/api/invoices/reminders');
    expect(count.status).toBe(200);
    expect(count.body.overdue).toBeGreaterThanOrEqual(2);
    expect(count.body.remindedRecently).toBeGreaterThanOrEqual(1);
    expect(count.body.toRemind).toBe(count.body.overdue - count.body.remindedRecently);
    const all = await treasurer.post('/api/invoices/reminders', {});
    expect(all.status).toBe(201);
    expect(all.body.sent).toBe(count.body.toRemind);
    expect(all.body.reminders.map((r: { targetId: string }) => r.targetId)).toContain(b.invoice.id);
    expect(all.body.reminders.map((r: { targetId: string }) => r.targetId)).not.toContain(a.invoice.id);
    expect(await remindersOf('invoice_id', a.invoice.id)).toHaveLength(1);
    expect(await remindersOf('invoice_id', b.invoice.id)).toHaveLength(1);
    // Everything was just reminded: a second run sends nothing.
    const second = await treasurer.post('/api/invoices/reminders', {});
    expect(second.body.sent).toBe(0);
    expect((await treasurer.get('/api/invoices/reminders')).body.toRemind).toBe(0);
    await ctx.waitForMail(b.member.email, /^Reminder: invoice/);
    expect(await mailsTo(a.member.email, /^Reminder: invoice/)).toHaveLength(1);
    expect((await member.post('/api/invoices/reminders', {})).status).toBe(403);
  });
});

describe('keg reminders', () => {
  async function overdueKeg(name: string) {
    const m = await createMember(ctx.db, { name });
    const keg = await createKeg(ctx.db);
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: m.id, at: new Date(now().getTime() - 20 * DAY), dueAt: new Date(now().getTime() - 3 * DAY) });
    return { member: m, keg };
  }

  it('lets the rota remind the holder of an overdue keg, once in 24 hours', async () => {
    const { member: m, keg } = await overdueKeg('Keg Keeper Kit');
    const res = await brewer.post(`/api/kegs/${keg.id}/reminders`, {});
    expect(res.status).toBe(201);
    expect(res.body.reminder).toMatchObject({ kind: 'keg', targetId: keg.id, sentTo: m.email });
    const mail = await ctx.waitForMail(m.email, /^Reminder: keg/);
    expect(mail.subject).toContain(keg.code);
    const view = await brewer.get(`/api/kegs/${keg.id}`);
    expect(view.body.keg.lastRemindedAt).toBe(res.body.reminder.sentAt);
    const overdue = await brewer.get('/api/kegs/overdue');
    expect(overdue.body.items.find((k: { id: string }) => k.id === keg.id).lastRemindedAt).toBe(res.body.reminder.sentAt);
    const again = await brewer.post(`/api/kegs/${keg.id}/reminders`, {});
    expect(again.status).toBe(409);
    expect(again.body.code).toBe('reminded_recently');
    const [row] = await remindersOf('keg_id', keg.id);
    expect(row).toMatchObject({ member_id: m.id, sent_by: brewer.user.id, sent_to: m.email });
    ctx.clock.advance(DAY + HOUR);
    expect((await brewer.post(`/api/kegs/${keg.id}/reminders`, {})).status).toBe(201);
  });

  it('refuses a keg that is not overdue (409), the treasurer and members (403 / 404)', async () => {
    const m = await createMember(ctx.db, { name: 'On Time Otto' });
    const keg = await createKeg(ctx.db);
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: m.id, at: now(), dueAt: new Date(now().getTime() + 7 * DAY) });
    const res = await brewer.post(`/api/kegs/${keg.id}/reminders`, {});
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('not_overdue');
    const late = await overdueKeg('Late Lou');
    expect((await treasurer.post(`/api/kegs/${late.keg.id}/reminders`, {})).status).toBe(403);
    expect((await member.post(`/api/kegs/${late.keg.id}/reminders`, {})).status).toBe(404);
    const admin = await ctx.signIn('admin@example.org');
    expect((await admin.post(`/api/kegs/${late.keg.id}/reminders`, {})).status).toBe(201);
    expect(await remindersOf('keg_id', keg.id)).toHaveLength(0);
  });
});
