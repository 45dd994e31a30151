import { type Kysely, sql } from 'kysely';

/** One-time links that lift a sign-in lock are user tokens too (stored hashed, expiring, single use). */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table user_token drop constraint user_token_purpose_check`.execute(db);
  await sql`alter table user_token add constraint user_token_purpose_check check (purpose in ('invitation','password_reset','account_unlock'))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`delete from user_token where purpose = 'account_unlock'`.execute(db);
  await sql`alter table user_token drop constraint user_token_purpose_check`.execute(db);
  await sql`alter table user_token add constraint user_token_purpose_check check (purpose in ('invitation','password_reset'))`.execute(db);
}
