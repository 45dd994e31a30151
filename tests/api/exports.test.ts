import { describe, expect, it } from 'vitest';
import { signInAs, type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { attachmentCalls, cellsOf, download, exportSources, exportsList, FORMULA_START, PLAIN_NUMBER, seedTypedExports } from '../helpers/exports.ts';
import type { ExportScope } from '../helpers/exports.ts';

/**
 * Every spreadsheet the API hands out (CSV and XLSX), fetched with member-typed text that begins like
 * a formula in every text column we can reach: no cell may start with =, +, -, @, a tab or a carriage
 * return unless it is a plain number, no XLSX cell is a formula, and numbers stay numbers.
 */

let ctx: TestContext;
let treasurer: ApiClient, brewer: ApiClient;
let scope: ExportScope;

/** Text a person types that a spreadsheet would otherwise run. */
const hostile = {
  member: '=HYPERLINK("http://example.org/x","Open me")',
  batch1: '=1+2',
  style1: '@SUM(A1:A9)',
  batch2: '+44 brew',
  style2: '-10% hops',
  batch3: '\tTabbed lager',
  style3: '\r=cmd',
  batch4: '＝1+1 full-width',
  charges: ['=2*3', '+1 extra', '-5 keg deposit', '@A1', '\t=tab'],
  reference: '=ref(1)',
  note: '@note',
  reason: '+refund reason',
};

useTestContext(async (created) => {
  ctx = created;
  [treasurer, brewer] = await signInAs(ctx, 'treasurer', 'brewer');
  // Batches packaged this month, named and styled as a member might; last month's invoice with charges
  // typed by the treasurer, one of them a credit (a negative amount); a payment and a refund (a credit
  // note with its reason typed, and a payment back, a negative amount).
  scope = await seedTypedExports(ctx, treasurer, {
    memberName: hostile.member,
    batches: [
      { name: hostile.batch1, style: hostile.style1 },
      { name: hostile.batch2, style: hostile.style2 },
      { name: hostile.batch3, style: hostile.style3 },
      { name: hostile.batch4, style: 'Pils' },
      { name: '-3.5', style: 'A name that is just a number' },
    ],
    gravities: [1.052, 1.011],
    kegLiters: 18.5,
    charges: hostile.charges,
    chargeCents: 250,
    chargeReason: '=reason',
    extraCharges: [{ amountCents: -350, description: 'Credit for a returned keg', reason: 'returned' }],
    payment: { amountCents: 300, reference: hostile.reference, note: hostile.note },
    refund: { amountCents: 150, reason: hostile.reason },
  });
});

const exports = () => exportsList({ treasurer, brewer }, scope);

describe('spreadsheet exports', () => {
  it('the list of exports here is every download the backend serves', () => {
    expect(attachmentCalls()).toEqual(exportSources);
    expect(exports().length).toBeGreaterThanOrEqual(Object.values(exportSources).reduce((a, b) => a + b, 0));
  });

  it('neutralises every formula-like text in every CSV and XLSX, and keeps numbers numbers', async () => {
    const seen = new Set<string>();
    for (const e of exports()) {
      const res = await download(e);
      expect(res.status, e.name).toBe(200);
      expect(res.headers['content-disposition'], e.name).toMatch(/^attachment;/);
      expect(res.headers['content-type'], e.name).toMatch(e.kind === 'csv' ? /^text\/csv/ : /spreadsheetml/);
      const { text, numbers, formulas } = await cellsOf(e.kind, res);
      expect(formulas, `${e.name}: formula cells`).toBe(0);
      const unsafe = text.filter((t) => FORMULA_START.test(t) && !PLAIN_NUMBER.test(t));
      expect(unsafe, `${e.name}: cells a spreadsheet would run`).toEqual([]);
      expect(numbers.length, `${e.name}: numbers`).toBeGreaterThan(0);
      for (const t of text) seen.add(t);
      if (e.name.startsWith('ledger')) {
        // The credit line and the refund are negative numbers, written as numbers.
        expect(
          numbers.some((n) => n < 0),
          `${e.name}: negative amounts`,
        ).toBe(true);
        expect(
          text.some((t) => /^'?-\d/.test(t) && PLAIN_NUMBER.test(t.replace(/^'/, ''))),
          `${e.name}: no number written as text`,
        ).toBe(false);
      }
      if (e.name.startsWith('production')) {
        // 18.5 L each, and the name that is just a number is still that number.
        expect(numbers, e.name).toContain(18.5);
        if (e.kind === 'csv') expect(numbers, e.name).toContain(-3.5);
        else expect(text, e.name).toContain('-3.5');
      }
    }
    // What was typed arrives, escaped and otherwise whole, in the files.
    const escaped = (s: string) => `'${s}`;
    for (const s of [
      hostile.member,
      hostile.batch1,
      hostile.style1,
      hostile.batch2,
      hostile.style2,
      hostile.batch3,
      hostile.style3,
      hostile.batch4,
      ...hostile.charges,
      hostile.reference,
      hostile.note,
      hostile.reason,
    ]) {
      expect(seen.has(escaped(s)), `${JSON.stringify(s)} escaped`).toBe(true);
    }
  });
});
