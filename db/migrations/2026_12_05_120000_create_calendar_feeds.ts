import { type Kysely, sql } from 'kysely';

/**
 * Private calendar feeds: a person's own bookings and due dates (`member`), or the cellar rota's
 * (`rota`). The link's token is never stored, only its SHA-256; making a new link revokes the old
 * one, and each person has at most one live feed of each kind.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create table calendar_feed (
    id uuid primary key default gen_random_uuid(),
    owner_id uuid not null references app_user (id) on delete cascade,
    kind text not null check (kind in ('member', 'rota')),
    token_hash text not null unique check (token_hash ~ '^[0-9a-f]{64}$'),
    created_at timestamptz not null default now(),
    revoked_at timestamptz
  )`.execute(db);
  await sql`create unique index calendar_feed_one_live_key on calendar_feed (owner_id, kind) where revoked_at is null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists calendar_feed`.execute(db);
}
