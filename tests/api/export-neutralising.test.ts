import { describe, expect, it } from 'vitest';
import { signInAs, type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { attachmentCalls, cellsOf, download, exportSources, exportsList, FORMULA_START, PLAIN_NUMBER, seedTypedExports } from '../helpers/exports.ts';
import type { ExportScope } from '../helpers/exports.ts';

/**
 * One test drives every CSV and XLSX export (the list shared with exports.test.ts, kept complete by the
 * count of downloads in backend/): text that begins like a formula, typed into every field a member,
 * brewer or treasurer fills that reaches an export, arrives with a leading apostrophe and otherwise
 * whole; no XLSX cell is a formula.
 */

let ctx: TestContext;
let treasurer: ApiClient, brewer: ApiClient;
let scope: ExportScope;

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

useTestContext(async (created) => {
  ctx = created;
  [treasurer, brewer] = await signInAs(ctx, 'treasurer', 'brewer');
  scope = await seedTypedExports(ctx, treasurer, {
    memberName: typed.memberName,
    batches: [
      { name: typed.batchName, style: typed.style, allergens: [typed.allergen] },
      { name: typed.fullWidthBatch, style: typed.fullWidthStyle },
      { name: typed.tabBatch, style: typed.crStyle },
    ],
    gravities: [1.05, 1.01],
    kegLiters: 19,
    checkOutFirstKeg: true,
    charges: typed.charges,
    chargeCents: 300,
    chargeReason: 'typed',
    payment: { amountCents: 400, reference: typed.reference, note: typed.note },
    refund: { amountCents: 100, reason: typed.reason },
  });
});

describe('every CSV and XLSX export neutralises formula text', () => {
  it('drives every download the backend serves', () => {
    expect(attachmentCalls()).toEqual(exportSources);
  });

  it('writes each typed text escaped and whole, never a cell a spreadsheet would run', async () => {
    const seen = { csv: new Set<string>(), xlsx: new Set<string>() };
    for (const e of exportsList({ treasurer, brewer }, scope)) {
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
