import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import express from 'express';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { PdfRenderPool, pdfRenderPool } from '../../backend/lib/pdf-render.ts';
import { problemHandler } from '../../backend/middleware/problem-handler.ts';
import type { AuditData } from '../../backend/modules/sanitation/audit-report-data.ts';
import { cycleFields, stepRows } from '../../backend/modules/sanitation/sanitation.repository.ts';
import { evaluateCycle } from '../../shared/cellar/sanitation-rules.ts';
import { defaultSanitationSettings } from '../../shared/schemas/cellar-settings.ts';
import { defaultBillingProfile } from '../../shared/schemas/billing.ts';
import type { SanitationStepInput } from '../../shared/schemas/sanitation.ts';
import { createFermenter } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { TEST_NOW } from '../helpers/time.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';

// The sanitation audit is laid out on a PDF render thread: while a long report renders, the same
// app instance keeps answering other requests, and a failure in the thread is a 500 problem.

let ctx: TestContext;
let brewer: ApiClient;
let vesselIds: string[] = [];
let cycleCount = 0;
const DAY = 86_400_000;
const MIN = 60_000;
const from = new Date('2025-12-01T00:00:00Z');
const to = new Date('2026-12-01T00:00:00Z');
const reportUrl = () => `/api/reports/sanitation-audit.pdf?from=2025-12-01&to=2026-11-30&equipmentId=${vesselIds.join(',')}`;

useTestContext(async (created) => {
  ctx = created;
  brewer = await ctx.signIn('brewer@example.org');
  // A year of a cycle every three days on twelve extra fermenters: a report of a hundred-odd pages.
  // The cycles go in as rows in bulk (a thousand-odd through the factory would take most of the test's time).
  const vessels = [];
  for (let i = 0; i < 12; i++) {
    vessels.push(
      await createFermenter(ctx.db, {
        code: `FY-${String(i + 1).padStart(2, '0')}`,
        name: `Yard fermenter ${i + 1}`,
        capacityLiters: 60,
        at: '2025-11-01T09:00:00Z',
      }),
    );
  }
  vesselIds = vessels.map((v) => v.id);
  const cycles: Record<string, unknown>[] = [];
  const steps: Record<string, unknown>[] = [];
  for (const [k, v] of vessels.entries()) {
    for (let t = from.getTime() + k * 3_600_000; t < to.getTime() - DAY; t += 3 * DAY) {
      const at = (ms: number) => new Date(t + ms).toISOString();
      const list: SanitationStepInput[] = [
        { step: 'clean', chemical: 'alkaline-cleaner', contactMinutes: 60, at: at(0) },
        { step: 'rinse', at: at(65 * MIN) },
        { step: 'sanitize', chemical: 'acid-sanitizer', contactMinutes: 2, at: at(75 * MIN) },
        { step: 'purge', contactMinutes: 0.5, at: at(80 * MIN) },
      ];
      const ev = evaluateCycle(list, defaultSanitationSettings);
      const id = crypto.randomUUID();
      cycles.push({ id, equipment_id: v.id, ...cycleFields(ev, defaultSanitationSettings), recorded_by: brewer.user.id });
      steps.push(...stepRows(id, ev, list, defaultSanitationSettings, brewer.user.id));
    }
  }
  cycleCount = cycles.length;
  for (let i = 0; i < cycles.length; i += 1000)
    await ctx.db
      .insertInto('sanitation_cycle')
      .values(cycles.slice(i, i + 1000) as never)
      .execute();
  for (let i = 0; i < steps.length; i += 2000)
    await ctx.db
      .insertInto('sanitation_step')
      .values(steps.slice(i, i + 2000) as never)
      .execute();
});

describe('a long sanitation audit renders off the event loop', () => {
  it('answers GET /api/health while a year of the audit is still being laid out', async () => {
    const order: string[] = [];
    const started = new Promise<void>((resolve) => pdfRenderPool.events.once('start', () => resolve()));
    const report = brewer
      .get(reportUrl())
      .buffer(true)
      .parse(binary)
      .then((res) => {
        order.push('audit');
        return res;
      });
    // Once the queries have run and the layout has been handed to a render thread…
    await started;
    order.push('rendering');
    // …the same app instance still answers, more than once, before the report is done.
    for (let i = 0; i < 3; i++) {
      const health = await request(ctx.app).get('/api/health');
      expect(health.status).toBe(200);
      expect(health.body).toEqual({ ok: true, db: 'up' });
      order.push('health');
    }
    const res = await report;
    expect(order).toEqual(['rendering', 'health', 'health', 'health', 'audit']);

    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/application\/pdf/);
    const text = pdfText(res.body as Buffer);
    expect(text).toContain('Period 1 Dec 2025 to 30 Nov 2026');
    expect(text).toContain(`12 vessels · ${cycleCount} cycles (${cycleCount} complete) · 0 fills`);
    expect(text).toContain('FY-12 · Yard fermenter 12');
    const pages = Number(/Page 1 of (\d+)/.exec(text)?.[1]);
    expect(pages).toBeGreaterThan(50);
    expect(text).toContain(`Page ${pages} of ${pages}`);
    expect(text).toContain(`${defaultBillingProfile.coopName} · Sanitation audit 1 Dec 2025 to 30 Nov 2026`);
  });

  it('renders two reports asked for at once, each complete', async () => {
    const [a, b] = await Promise.all([
      brewer.get(reportUrl()).buffer(true).parse(binary),
      brewer.get(`/api/reports/sanitation-audit.pdf?from=2026-03-01&to=2026-03-31&equipmentId=${vesselIds[0]}`).buffer(true).parse(binary),
    ]);
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    expect(pdfText(a.body as Buffer)).toContain('12 vessels');
    const small = pdfText(b.body as Buffer);
    expect(small).toContain('1 vessels · ');
    expect(small).toContain('Period 1 Mar 2026 to 31 Mar 2026');
    expect(small).toContain('FY-01');
  });
});

describe('failures on a render thread', () => {
  const pool = new PdfRenderPool({ size: 1 });
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cw-render-'));
  const stopper = path.join(dir, 'stops-thread.mjs');
  fs.writeFileSync(stopper, 'export function render() { process.exit(3); }\n');
  afterAll(async () => {
    await pool.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const coop = { coopName: 'Quarry Lane Brewers', addressLines: ['2 Quarry Lane'], email: 'books@quarry.example', timeZone: 'Europe/London' };
  const broken = { from, to, producedAt: new Date(TEST_NOW), coop, vessels: null, exceptions: [], settings: defaultSanitationSettings } as unknown as AuditData;
  const auditModule = new URL('../../backend/modules/sanitation/audit-report.ts', import.meta.url);

  it('reach the problem handler as a 500 problem, and the process and the pool carry on', async () => {
    const app = express();
    app.get('/render', async (_req, res) => {
      const pdf = await pool.render({ module: auditModule, exportName: 'renderAuditPdf', args: [broken, 'every fermenter and keg'] });
      res.type('application/pdf').send(pdf);
    });
    app.use(problemHandler);
    const res = await request(app).get('/render');
    expect(res.status).toBe(500);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 500, title: 'Internal server error' });

    // The same thread renders a good report next.
    const good = await pool.render({ module: auditModule, exportName: 'renderAuditPdf', args: [{ ...broken, vessels: [] }, 'every fermenter and keg'] });
    expect(good.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdfText(good)).toContain('0 vessels · 0 cycles');
    expect(pdfText(good)).toContain('Quarry Lane Brewers');
  });

  it('reject only the job of a thread that stops, and start a new thread for the next', async () => {
    await expect(pool.render({ module: pathToFileURL(stopper), exportName: 'render', args: [] })).rejects.toThrow(/stopped \(exit code 3\)/);
    await expect(pool.render({ module: auditModule, exportName: 'noSuchExport', args: [] })).rejects.toThrow(/has no export noSuchExport/);
    const good = await pool.render({ module: auditModule, exportName: 'renderAuditPdf', args: [{ ...broken, vessels: [] }, 'every keg'] });
    expect(pdfText(good)).toContain('every keg');
  });
});

describe('warming the render thread at start', () => {
  it('lays out a small PDF in the thread, so the first audit does not pay the start-up', async () => {
    const { warmAuditRenderer } = await import('../../backend/modules/sanitation/audit-report.ts');
    const pdf = await warmAuditRenderer();
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const text = execFileSync('pdftotext', ['-', '-'], { input: pdf }).toString();
    expect(text).toContain('Cellarwright');
  });
});
