// The benchmark data set: the demo co-op after five years at a hundred co-ops' scale. On top of the demo
// seed: 200 members, 120 more vessels (so that 50,000 bookings fit without clashing), 50,000 bookings,
// 2,000 batches with 1,000,000 readings, 5,000 invoices with their payments (some overpaid), five years of
// sanitation cycles and an audit row per booking. Accounts and vessels come from the factories; the bulk
// rows go in many at a time (`insertInChunks`), or are cloned in SQL from rows the factories made
// (`insert … select … generate_series`), so the database's constraints check every row as usual.
//
// `benchDataset(label)` gives each benchmark its own copy: the data set is built once into the template
// database `cellarwright_bench_tpl`, marked with a comment naming the migrations and the day it was
// built, and each run clones it with CREATE DATABASE … TEMPLATE (seconds, not minutes).
import { execFileSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { type Insertable, sql } from 'kysely';
import pg from 'pg';
import { createDb, type Database } from '../db/database.ts';
import type { DB } from '../db/schema.ts';
import { createEquipment, createMember, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { insertInChunks } from '../../db/seeds/write.ts';

export const BENCH_TEMPLATE = 'cellarwright_bench_tpl';
export const BENCH_SIZE = { members: 200, kegs: 100, fermenters: 20, bookings: 50_000, batches: 2_000, readings: 1_000_000, invoices: 5_000, years: 5 };

const YEAR = 365 * DAY;

/** What the data set holds, counted from the database. */
export async function datasetCounts(db: Database) {
  const count = async (table: keyof DB) => Number((await sql<{ n: string }>`select count(*) as n from ${sql.table(table)}`.execute(db)).rows[0]!.n);
  return {
    members: Number((await sql<{ n: string }>`select count(*) as n from app_user where 'member' = any(roles)`.execute(db)).rows[0]!.n),
    equipment: await count('equipment'),
    bookings: await count('booking'),
    batches: await count('batch'),
    readings: await count('reading'),
    invoices: await count('invoice'),
    payments: await count('payment'),
    sanitationCycles: await count('sanitation_cycle'),
    sanitationSteps: await count('sanitation_step'),
    auditRows: await count('audit_log'),
  };
}

async function addMembers(db: Database) {
  const have = (
    await db
      .selectFrom('app_user')
      .select('id')
      .where(sql<boolean>`'member' = any(roles)`)
      .orderBy('email')
      .execute()
  ).map((u) => u.id);
  const made = [];
  for (let i = have.length; i < BENCH_SIZE.members; i += 1) {
    made.push(await createMember(db, { email: `bench.member${i}@example.org`, name: `Bench Member ${i}`, createdAt: '2020-01-01T00:00:00Z' }));
  }
  return [...have, ...made.map((m) => m.id)];
}

async function addVessels(db: Database) {
  const vessels = [];
  for (let i = 0; i < BENCH_SIZE.fermenters; i += 1) vessels.push(await createEquipment(db, 'fermenter', { code: `BF-${String(i + 1).padStart(3, '0')}` }));
  for (let i = 0; i < BENCH_SIZE.kegs; i += 1) vessels.push(await createEquipment(db, 'keg', { code: `BK-${String(i + 1).padStart(3, '0')}` }));
  return vessels.map((v) => ({ id: v.id, kind: v.kind }));
}

/** 50,000 bookings over five years and two months ahead, each item's one after another with room for its cleaning. */
function bookingRows(vessels: { id: string }[], members: string[], now: Date, bufferHours: number): Insertable<DB['booking']>[] {
  const perItem = Math.ceil(BENCH_SIZE.bookings / vessels.length);
  const first = now.getTime() - BENCH_SIZE.years * YEAR;
  const slot = (BENCH_SIZE.years * YEAR + 60 * DAY) / perItem;
  const length = slot - bufferHours * HOUR - 12 * HOUR;
  const rows: Insertable<DB['booking']>[] = [];
  for (let n = 0; n < BENCH_SIZE.bookings; n += 1) {
    const item = n % vessels.length;
    const k = Math.floor(n / vessels.length);
    const startsAt = new Date(first + k * slot + item * 3 * HOUR);
    const endsAt = new Date(startsAt.getTime() + length);
    const ownerId = members[(n * 7 + k) % members.length]!;
    const cancelled = n % 23 === 0;
    const state = cancelled ? 'cancelled' : endsAt <= now ? 'finished' : startsAt <= now ? 'in_use' : 'booked';
    rows.push({
      equipment_id: vessels[item]!.id,
      owner_id: ownerId,
      starts_at: startsAt,
      ends_at: endsAt,
      blocked_until: new Date(endsAt.getTime() + bufferHours * HOUR),
      state,
      cancelled_at: cancelled ? new Date(startsAt.getTime() - DAY) : null,
      cancelled_by: cancelled ? ownerId : null,
      created_by: ownerId,
      created_at: new Date(startsAt.getTime() - 14 * DAY),
      updated_at: new Date(startsAt.getTime() - 14 * DAY),
    });
  }
  return rows;
}

/** 2,000 batches over five years, then 500 readings each (every two hours, a falling gravity) made in SQL. */
async function addBatchesAndReadings(db: Database, members: string[], now: Date) {
  const perBatch = BENCH_SIZE.readings / BENCH_SIZE.batches;
  const span = BENCH_SIZE.years * YEAR - 60 * DAY;
  const rows: Insertable<DB['batch']>[] = Array.from({ length: BENCH_SIZE.batches }, (_, i) => {
    const createdAt = new Date(now.getTime() - BENCH_SIZE.years * YEAR + (i * span) / BENCH_SIZE.batches);
    const recent = createdAt.getTime() > now.getTime() - 45 * DAY;
    return {
      owner_id: members[i % members.length]!,
      name: `Bench batch ${i + 1}`,
      style: ['Pale ale', 'Stout', 'Pilsner', 'Saison'][i % 4]!,
      volume_liters: '25',
      target_og: '1.0500',
      target_fg: '1.0100',
      status: recent ? 'fermenting' : 'packaged',
      packaged_at: recent ? null : new Date(createdAt.getTime() + 45 * DAY),
      packaged_liters: recent ? null : '23',
      created_by: members[i % members.length]!,
      created_at: createdAt,
      updated_at: createdAt,
    };
  });
  await insertInChunks(db, 'batch', rows, { size: 2000 });
  await sql`
    insert into reading (batch_id, taken_at, gravity_sg, entered_value, entered_unit, temperature_c, source, created_by, created_at)
    select b.id, b.created_at + g * interval '2 hours', r.sg, r.sg, 'sg', 19.5 + (g % 7) / 10.0, 'import', b.owner_id, b.created_at + g * interval '2 hours'
    from batch b
    cross join generate_series(0, ${perBatch - 1}::int) g
    cross join lateral (select round((1.010 + 0.040 * exp(-g / 120.0))::numeric, 4) as sg) r
    where b.name like 'Bench batch %'`.execute(db);
}

/** 200 members × 25 months of invoices, all issued; those older than two months paid, one in fifty overpaid. */
async function addInvoices(db: Database, members: string[], now: Date) {
  // The demo's own invoices keep their member and month (one invoice per member and period).
  const taken = new Set((await db.selectFrom('invoice').select(['member_id', 'period']).execute()).map((i) => `${i.member_id} ${i.period}`));
  const invoices: Insertable<DB['invoice']>[] = [];
  let seq = 100_000;
  for (let m = 1; invoices.length < BENCH_SIZE.invoices; m += 1) {
    const start = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - m, 1));
    const period = start.toISOString().slice(0, 7);
    const issued = new Date(Date.UTC(start.getUTCFullYear(), start.getUTCMonth() + 1, 1));
    const issuedOn = issued.toISOString().slice(0, 10);
    const dueOn = new Date(issued.getTime() + 30 * DAY).toISOString().slice(0, 10);
    const year = issued.getUTCFullYear();
    for (const [i, memberId] of members.entries()) {
      if (invoices.length >= BENCH_SIZE.invoices) break;
      if (taken.has(`${memberId} ${period}`)) continue;
      const subtotal = 2000 + ((i * 37 + m * 11) % 60) * 100;
      const tax = Math.round(subtotal * 0.2);
      const paid = m > 2;
      seq += 1;
      invoices.push({
        member_id: memberId,
        period,
        status: paid ? 'paid' : 'issued',
        number: `${year}-B${seq}`,
        number_year: year,
        number_seq: seq,
        currency: 'EUR',
        issued_on: issuedOn,
        due_on: dueOn,
        subtotal_cents: subtotal,
        tax_cents: tax,
        total_cents: subtotal + tax,
        paid_cents: paid ? subtotal + tax : 0,
        paid_at: paid ? new Date(issued.getTime() + 20 * DAY) : null,
        sent_at: issued,
        created_at: issued,
        updated_at: issued,
      });
    }
  }
  await insertInChunks(db, 'invoice', invoices, { size: 2000 });
  // One payment per paid invoice, received five days before it fell due; one in fifty paid 5.00 too much.
  await sql`
    insert into payment (invoice_id, member_id, method, amount_cents, currency, received_on, reference, overpaid_cents, created_at)
    select id, member_id, 'bank_transfer', total_cents + case when number_seq % 50 = 0 then 500 else 0 end, currency, due_on - 5,
           number, case when number_seq % 50 = 0 then 500 else 0 end, paid_at
    from invoice where status = 'paid' and number like '%-B%'`.execute(db);
}

/**
 * Five years of sanitation: one good cycle per kind of vessel made by the factory (checked by the co-op's
 * rules), then copied to every bench vessel every ten days, steps and all, shifted in time.
 */
async function addSanitation(db: Database, vessels: { id: string; kind: string }[], now: Date) {
  const first = new Date(now.getTime() - BENCH_SIZE.years * YEAR);
  const every = 10 * DAY;
  const count = Math.floor((BENCH_SIZE.years * YEAR - 2 * DAY) / every);
  for (const kind of ['fermenter', 'keg']) {
    const ofKind = vessels.filter((v) => v.kind === kind);
    const source = await createSanitationCycle(db, { equipmentId: ofKind[0]!.id, readyAt: first });
    await sql`
      with shifted as (
        select e.id as equipment_id, (g * ${every}::bigint + e.n * 3600000::bigint) * interval '1 millisecond' as shift
        from unnest(${ofKind.map((v) => v.id)}::uuid[]) with ordinality as e(id, n)
        cross join generate_series(1, ${count}::int) g
      ),
      made as (
        insert into sanitation_cycle (equipment_id, started_at, completed_at, outcome, complete, issues, freshness_days, fresh_until, recorded_by, notes, created_at)
        select s.equipment_id, c.started_at + s.shift, c.completed_at + s.shift, c.outcome, c.complete, c.issues, c.freshness_days,
               c.fresh_until + s.shift, c.recorded_by, c.notes, c.created_at + s.shift
        from sanitation_cycle c cross join shifted s
        where c.id = ${source.id}
        returning id, started_at
      )
      insert into sanitation_step (cycle_id, position, step, chemical_id, chemical, concentration, concentration_unit, contact_minutes,
                                   minimum_contact_minutes, purge_method, co2_grams, solution_liters, performed_by, at, ok, note, vented)
      select m.id, st.position, st.step, st.chemical_id, st.chemical, st.concentration, st.concentration_unit, st.contact_minutes,
             st.minimum_contact_minutes, st.purge_method, st.co2_grams, st.solution_liters, st.performed_by,
             st.at + (m.started_at - c.started_at), st.ok, st.note, st.vented
      from made m
      cross join sanitation_cycle c
      join sanitation_step st on st.cycle_id = c.id
      where c.id = ${source.id}`.execute(db);
  }
}

/** Builds the data set into `db` (migrated and seeded with the demo co-op), as of `now`. */
export async function buildBenchDataset(db: Database, now: Date, log: (line: string) => void = () => undefined) {
  let t0 = performance.now();
  const step = async (what: string, fn: () => Promise<unknown>) => {
    await fn();
    log(`${what}: ${((performance.now() - t0) / 1000).toFixed(1)} s`);
    t0 = performance.now();
  };
  let members: string[] = [];
  let vessels: { id: string; kind: string }[] = [];
  await step('members', async () => (members = await addMembers(db)));
  await step('vessels', async () => (vessels = await addVessels(db)));
  const rules = await db.selectFrom('setting').select('value').where('key', '=', 'booking_rules').executeTakeFirst();
  const bufferHours = Number((rules?.value as { cleaningBufferHours?: number } | undefined)?.cleaningBufferHours ?? 24);
  await step('bookings', () => insertInChunks(db, 'booking', bookingRows(vessels, members, now, bufferHours), { size: 4000 }));
  await step('audit rows', () =>
    sql`
      insert into audit_log (actor_id, action, subject_type, subject_id, detail, at)
      select owner_id, 'created', 'Booking', id::text, jsonb_build_object('equipmentId', equipment_id, 'startsAt', starts_at), created_at
      from booking where equipment_id in (select id from equipment where code like 'B_-%')`.execute(db),
  );
  await step('batches and readings', () => addBatchesAndReadings(db, members, now));
  await step('invoices and payments', () => addInvoices(db, members, now));
  await step('sanitation cycles', () => addSanitation(db, vessels, now));
  // A production database is vacuumed by autovacuum as it goes; a freshly loaded one is not, so its plans would
  // differ (no index-only scans: every page of the bulk tables is yet to be marked all-visible).
  await step('vacuum', () => sql`vacuum (analyze)`.execute(db));
}

/** The marker the template carries: the data set's size and the migrations it was built with, and the day. */
function marker(now: Date) {
  const migrations = fs.readdirSync(path.resolve('db/migrations')).sort().join(',');
  const digest = createHash('sha256')
    .update(JSON.stringify(BENCH_SIZE) + migrations + fs.readFileSync(new URL(import.meta.url), 'utf8'))
    .digest('hex')
    .slice(0, 16);
  return `cellarwright bench data set ${digest} built ${now.toISOString().slice(0, 10)}`;
}

function databaseUrl(adminUrl: string, name: string) {
  const u = new URL(adminUrl);
  u.pathname = `/${name}`;
  return u.toString();
}

/** Builds the template database unless one with today's marker is there; prints how long it took. */
async function ensureTemplate(admin: pg.Client, adminUrl: string, now: Date) {
  const want = marker(now);
  const have = await admin.query<{ comment: string | null }>(`select shobj_description(oid, 'pg_database') as comment from pg_database where datname = $1`, [
    BENCH_TEMPLATE,
  ]);
  if (have.rows[0]?.comment === want) return { built: false, ms: 0 };
  const t0 = performance.now();
  const building = `${BENCH_TEMPLATE}_building`;
  await admin.query(`drop database if exists ${building} with (force)`);
  await admin.query(`create database ${building}`);
  const url = databaseUrl(adminUrl, building);
  const tsx = path.resolve('node_modules/.bin/tsx');
  const env = { ...process.env, DATABASE_URL: url };
  execFileSync(tsx, ['db/migrate.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  execFileSync(tsx, ['db/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  const { db } = createDb(url, 4);
  try {
    await buildBenchDataset(db, now, (line) => console.log(`  data set: ${line}`));
  } finally {
    await db.destroy();
  }
  await admin.query(`drop database if exists ${BENCH_TEMPLATE} with (force)`);
  await admin.query(`alter database ${building} rename to ${BENCH_TEMPLATE}`);
  await admin.query(`comment on database ${BENCH_TEMPLATE} is '${want}'`);
  return { built: true, ms: performance.now() - t0 };
}

/** A copy of the benchmark data set for one benchmark, on the server DATABASE_URL points at. */
export async function benchDataset(label: string, { now = new Date() }: { now?: Date } = {}) {
  const adminUrl = process.env.DATABASE_URL;
  if (!adminUrl) throw new Error('DATABASE_URL is required (npm run bench starts one)');
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  const template = await ensureTemplate(admin, adminUrl, now);
  const name = `cw_bench_${label}_${randomBytes(3).toString('hex')}`;
  const t0 = performance.now();
  await admin.query(`create database ${name} template ${BENCH_TEMPLATE}`);
  const cloneMs = performance.now() - t0;
  const url = databaseUrl(adminUrl, name);
  const { db, pool } = createDb(url, 8);
  return {
    url,
    db,
    pool,
    /** Whether this run built the template, and how long building and cloning took. */
    template: { ...template, cloneMs },
    async drop() {
      await db.destroy();
      await admin.query(`drop database if exists ${name} with (force)`);
      await admin.end();
    },
  };
}
