import { type Kysely, sql } from 'kysely';

/**
 * Reminders for an overdue invoice or a keg overdue back from a member: who sent one, to whom and
 * when (by the app's clock). Each reminder keeps its target quiet until `quiet_until`; two reminders
 * of one invoice or one keg whose quiet times overlap are refused by exclusion constraints, so a
 * double click or two instances at once can never send twice.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create table reminder (
    id uuid primary key default gen_random_uuid(),
    kind text not null check (kind in ('invoice', 'keg')),
    invoice_id uuid references invoice (id) on delete cascade,
    keg_id uuid references equipment (id) on delete cascade,
    member_id uuid not null references app_user (id) on delete cascade,
    sent_to text not null check (sent_to <> ''),
    sent_by uuid references app_user (id) on delete set null,
    sent_at timestamptz not null,
    quiet_until timestamptz not null,
    created_at timestamptz not null default now(),
    constraint reminder_target_check check ((kind = 'invoice' and invoice_id is not null and keg_id is null) or (kind = 'keg' and keg_id is not null and invoice_id is null)),
    constraint reminder_quiet_check check (quiet_until > sent_at),
    constraint reminder_invoice_quiet_excl exclude using gist (invoice_id with =, tstzrange(sent_at, quiet_until, '[)') with &&) where (invoice_id is not null),
    constraint reminder_keg_quiet_excl exclude using gist (keg_id with =, tstzrange(sent_at, quiet_until, '[)') with &&) where (keg_id is not null)
  )`.execute(db);
  await sql`create index reminder_invoice_idx on reminder (invoice_id, sent_at desc) where invoice_id is not null`.execute(db);
  await sql`create index reminder_keg_idx on reminder (keg_id, sent_at desc) where keg_id is not null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists reminder`.execute(db);
}
