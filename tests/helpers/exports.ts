import fs from 'node:fs';
import path from 'node:path';
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import type { Response } from 'superagent';
import { expect } from 'vitest';
import { createBatch, createInvoice, createKeg, createKegCheckout, createManualCharge, createMember, DAY, fillKeg } from '../../db/factories/index.ts';
import type { ApiClient, TestContext } from './context.ts';

/**
 * Every CSV and XLSX download the API serves, in one list shared by the export tests
 * (tests/api/exports.test.ts, tests/api/export-neutralising.test.ts), and how to read their cells back.
 * `exportSources` counts the `.attachment(` calls per backend file: a new download fails the check that
 * compares the two until it is added here, and so is driven by every export test.
 */

/** Text a spreadsheet would run: it begins with =, +, -, @ (or their full-width forms), a tab or a carriage return. */
export const FORMULA_START = /^[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/;
/** Text that is only a number (a number is no formula). */
export const PLAIN_NUMBER = /^[+-]?(\d+([.,]\d+)?|[.,]\d+)([eE][+-]?\d+)?$/;

export interface ExportTarget {
  name: string;
  client: ApiClient;
  url: string;
  kind: 'csv' | 'xlsx';
}

/** Every CSV and XLSX the API serves, with who may fetch it. Kept complete by `exportSources`. */
/** Where the exports find the seeded data: the billing period, a traced batch and the day it was packaged. */
export interface ExportScope {
  period: string;
  tracedBatchId: string;
  traceDay: string;
}

export function exportsList(
  { treasurer, brewer }: { treasurer: ApiClient; brewer: ApiClient },
  { period, tracedBatchId, traceDay }: ExportScope,
): ExportTarget[] {
  return [
    { name: 'ledger CSV', client: treasurer, url: `/api/invoices/export?period=${period}&format=csv`, kind: 'csv' },
    { name: 'ledger XLSX', client: treasurer, url: `/api/invoices/export?period=${period}&format=xlsx`, kind: 'xlsx' },
    { name: 'production records CSV', client: treasurer, url: '/api/production-records?format=csv', kind: 'csv' },
    { name: 'production records export CSV', client: treasurer, url: '/api/production-records/export', kind: 'csv' },
    { name: 'production records XLSX', client: treasurer, url: '/api/production-records/export?format=xlsx', kind: 'xlsx' },
    { name: 'readings template CSV', client: brewer, url: '/api/readings/template.csv', kind: 'csv' },
    { name: 'readings template XLSX', client: brewer, url: '/api/readings/template.xlsx', kind: 'xlsx' },
    { name: 'trace of a batch CSV', client: brewer, url: `/api/batches/${tracedBatchId}/trace.csv`, kind: 'csv' },
    { name: 'trace report CSV', client: treasurer, url: `/api/reports/trace?from=${traceDay}&to=${traceDay}&format=csv`, kind: 'csv' },
  ];
}

/** The files in backend/ that send a download (`.attachment(`): each must be one of the exports above. */
export const exportSources = {
  'modules/billing/billing-exports.routes.ts': 2,
  'modules/batches/production-records.routes.ts': 2,
  'modules/batches/readings.routes.ts': 2,
  'modules/batches/trace.routes.ts': 2,
};

function backendFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return e.name === '__tests__' ? [] : backendFiles(p);
    return /\.(ts|mts|js|mjs)$/.test(e.name) ? [p] : [];
  });
}

/** How many `.attachment(` calls each backend file makes, by path below backend/. */
export function attachmentCalls(): Record<string, number> {
  const root = path.resolve(import.meta.dirname, '../../backend');
  const found: Record<string, number> = {};
  for (const file of backendFiles(root)) {
    const n = (fs.readFileSync(file, 'utf8').match(/\.attachment\(/g) ?? []).length;
    if (n) found[path.relative(root, file)] = n;
  }
  return found;
}

const binary = (res: Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

/** Fetches one export (an XLSX as bytes). */
export function download(e: ExportTarget): Promise<Response> {
  const req = e.client.get(e.url);
  return e.kind === 'xlsx' ? req.buffer(true).parse(binary) : req;
}

/** The cells of a downloaded export: text, numbers, and how many XLSX cells are formulas. */
export async function cellsOf(kind: 'csv' | 'xlsx', res: Response): Promise<{ text: string[]; numbers: number[]; formulas: number }> {
  const text: string[] = [];
  const numbers: number[] = [];
  let formulas = 0;
  if (kind === 'csv') {
    const parsed = Papa.parse<string[]>(res.text.replace(/^\ufeff/, ''), { skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    for (const row of parsed.data) {
      for (const cell of row) {
        if (PLAIN_NUMBER.test(cell)) numbers.push(Number(cell.replace(',', '.')));
        else text.push(cell);
      }
    }
    return { text, numbers, formulas };
  }
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(res.body);
  for (const ws of wb.worksheets) {
    ws.eachRow((row) =>
      row.eachCell((cell) => {
        const v = cell.value;
        if (cell.type === ExcelJS.ValueType.Formula || cell.formula) formulas++;
        if (typeof v === 'number') numbers.push(v);
        else if (typeof v === 'string') text.push(v);
        else if (v && typeof v === 'object' && 'richText' in v) text.push(v.richText.map((t) => t.text).join(''));
      }),
    );
  }
  return { text, numbers, formulas };
}

/** What a member and the treasurer typed, seeded by `seedTypedExports` so that every export carries it. */
export interface TypedExportData {
  memberName: string;
  batches: { name: string; style: string; allergens?: string[] }[];
  /** Charge descriptions, each on last month's invoice at `chargeCents`. */
  charges: string[];
  chargeCents: number;
  chargeReason: string;
  /** Further charges (a credit is a negative amount). */
  extraCharges?: { description: string; amountCents: number; reason: string }[];
  payment: { amountCents: number; reference: string; note: string };
  refund: { amountCents: number; reason: string };
  /** Litres filled into each batch's keg, and its readings (original and final gravity). */
  kegLiters: number;
  gravities: [number, number];
  /** The first batch's keg goes out with the member, so the member's name reaches the trace as its holder. */
  checkOutFirstKeg?: boolean;
}

/**
 * Seeds a member, batches packaged this month (one keg each, an hour apart), last month's invoice with
 * the typed charges, a payment and a refund; answers what `exportsList` needs to reach them.
 */
export async function seedTypedExports(ctx: TestContext, treasurer: ApiClient, data: TypedExportData): Promise<ExportScope> {
  const now = ctx.clock.now();
  const today = now.toISOString().slice(0, 10);
  const period = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1)).toISOString().slice(0, 7);
  const scope: ExportScope = { period, tracedBatchId: '', traceDay: '' };
  const member = await createMember(ctx.db, { name: data.memberName });
  for (const [i, b] of data.batches.entries()) {
    const at = new Date(now.getTime() - (i + 1) * 3600_000);
    const [og, fg] = data.gravities;
    const readings = [
      { takenAt: new Date(at.getTime() - 9 * DAY), value: og },
      { takenAt: new Date(at.getTime() - 2 * DAY), value: fg },
    ];
    const batch = await createBatch(ctx.db, { ownerId: member.id, ...b, readings });
    const keg = await createKeg(ctx.db, { state: 'ready' });
    await fillKeg(ctx.db, { kegId: keg.id, at, batchId: batch.id, volumeLiters: data.kegLiters });
    if (i > 0) continue;
    scope.tracedBatchId = batch.id;
    scope.traceDay = at.toISOString().slice(0, 10);
    if (data.checkOutFirstKeg) {
      await createKegCheckout(ctx.db, { kegId: keg.id, memberId: member.id, at: new Date(at.getTime() + 60_000), dueAt: new Date(at.getTime() + 7 * DAY) });
    }
  }
  const charges = [
    ...data.charges.map((description) => ({ description, amountCents: data.chargeCents, reason: data.chargeReason })),
    ...(data.extraCharges ?? []),
  ];
  for (const c of charges) await createManualCharge(ctx.db, { memberId: member.id, period, ...c });
  const invoice = await createInvoice(ctx.db, { memberId: member.id, period, today });
  const paid = await treasurer.post(`/api/invoices/${invoice.id}/payments`, { ...data.payment, method: 'bank_transfer', receivedOn: today });
  expect(paid.status).toBe(201);
  const refund = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { ...data.refund, refundMethod: 'cash' });
  expect(refund.status).toBe(201);
  return scope;
}
