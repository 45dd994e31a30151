import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createInvoice, createKeg, createKegCheckout, createManualCharge, createMember, DAY, fillKeg } from '../../db/factories/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { attachmentCalls, cellsOf, download, exportSources, exportsList, FORMULA_START, PLAIN_NUMBER } from '../helpers/exports.ts';

/**
 * One test drives every CSV and XLSX export (the list shared with exports.test.ts, kept complete by the
 * count of downloads in backend/): text that begins like a formula, typed into every field a member,
 * brewer or treasurer fills that reaches an export, arrives with a leading apostrophe and otherwise
 * whole; no XLSX cell is a formula.
 */

let ctx: TestContext;
let treasurer: ApiClient;
let brewer: ApiClient;
let period: string;
let tracedBatchId: string;
let traceDay: string;

/** Every way a cell can begin a formula: =, +, -, @, their full-width forms, a leading tab or carriage return. */
const typed = {
  memberName: '=1+1 member',
  batchName: '+cmd batch',
  style: '@SUM(A1) style',
  allergen: '-2+3 nuts',
  fullWidthBatch: '＝1+1 full-width batch',
  fullWidthStyle: '＠home style',
  tabBatch: '\tTabbed batch',
  crStyle: '\r=cr style',
  charges: ['=2*3 charge', '+1 extra', '-5 keg deposit', '@A1 charge', '\t=tab charge', '＋full-width plus', '－full-width minus', '\rcarriage charge'],
  reference: '=ref(1)',
  note: '@note typed',
  reason: '+refund reason',
};

beforeAll(async () => {
  ctx = await createTestContext();
  treasurer = await ctx.signIn('treasurer@example.org');
  brewer = await ctx.signIn('brewer@example.org');
  const now = ctx.clock.now();
  const today = now.toISOString().slice(0, 10);
  period = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1)).toISOString().slice(0, 7);

  const member = await createMember(ctx.db, { name: typed.memberName });
  const batches = [
    { name: typed.batchName, style: typed.style, allergens: [typed.allergen] },
    { name: typed.fullWidthBatch, style: typed.fullWidthStyle },
    { name: typed.tabBatch, style: typed.crStyle },
  ];
  for (const [i, b] of batches.entries()) {
    const at = new Date(now.getTime() - (i + 1) * 3600_000);
    const batch = await createBatch(ctx.db, {
      ownerId: member.id,
      ...b,
      readings: [
        { takenAt: new Date(at.getTime() - 9 * DAY), value: 1.05 },
        { takenAt: new Date(at.getTime() - 2 * DAY), value: 1.01 },
      ],
    });
    const keg = await createKeg(ctx.db, { state: 'ready' });
    await fillKeg(ctx.db, { kegId: keg.id, at, batchId: batch.id, volumeLiters: 19 });
    if (i === 0) {
      tracedBatchId = batch.id;
      traceDay = at.toISOString().slice(0, 10);
      // The member takes the keg out: the member's name reaches the trace as its holder.
      await createKegCheckout(ctx.db, { kegId: keg.id, memberId: member.id, at: new Date(at.getTime() + 60_000), dueAt: new Date(at.getTime() + 7 * DAY) });
    }
  }

  for (const description of typed.charges) {
    await createManualCharge(ctx.db, { memberId: member.id, period, amountCents: 300, description, reason: 'typed' });
  }
  const invoice = await createInvoice(ctx.db, { memberId: member.id, period, today });
  const paid = await treasurer.post(`/api/invoices/${invoice.id}/payments`, {
    amountCents: 400,
    method: 'bank_transfer',
    receivedOn: today,
    reference: typed.reference,
    note: typed.note,
  });
  expect(paid.status).toBe(201);
  const refund = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 100, reason: typed.reason, refundMethod: 'cash' });
  expect(refund.status).toBe(201);
});
afterAll(async () => ctx?.close());

describe('every CSV and XLSX export neutralises formula text', () => {
  it('drives every download the backend serves', () => {
    expect(attachmentCalls()).toEqual(exportSources);
  });

  it('writes each typed text escaped and whole, never a cell a spreadsheet would run', async () => {
    const seen = { csv: new Set<string>(), xlsx: new Set<string>() };
    for (const e of exportsList({ treasurer, brewer }, { period, tracedBatchId, traceDay })) {
      const res = await download(e);
      expect(res.status, e.name).toBe(200);
      const { text, formulas } = await cellsOf(e.kind, res);
      expect(formulas, `${e.name}: formula cells`).toBe(0);
      expect(
        text.filter((t) => FORMULA_START.test(t) && !PLAIN_NUMBER.test(t)),
        `${e.name}: cells a spreadsheet would run`,
      ).toEqual([]);
      for (const t of text) seen[e.kind].add(t);
    }
    const escaped = (s: string) => `'${s}`;
    const everywhere = [
      typed.memberName,
      typed.batchName,
      typed.style,
      typed.fullWidthBatch,
      typed.fullWidthStyle,
      typed.tabBatch,
      typed.crStyle,
      ...typed.charges,
      typed.reference,
      typed.note,
      typed.reason,
    ];
    // Both formats carry every one of them (the ledger and the production records have an XLSX too).
    for (const s of everywhere) {
      expect(seen.csv.has(escaped(s)), `CSV: ${JSON.stringify(s)} escaped`).toBe(true);
      // A workbook keeps a carriage return as a line end, so it is read back as one.
      expect(
        [...seen.xlsx].some((t) => t.replace(/\r\n?/g, '\n') === escaped(s).replace(/\r\n?/g, '\n')),
        `XLSX: ${JSON.stringify(s)} escaped`,
      ).toBe(true);
    }
    // The trace's allergens (only in the trace CSV) begin with the batch's own note.
    expect(
      [...seen.csv].some((t) => t.startsWith(escaped(typed.allergen))),
      'allergens escaped',
    ).toBe(true);
  });
});
