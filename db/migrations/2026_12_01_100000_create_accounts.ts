import { type Kysely, sql } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
  await sql`create extension if not exists btree_gist`.execute(db);

  await db.schema
    .createTable('app_user')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('email', 'text', (c) => c.notNull().check(sql`email = lower(email) and email like '%_@_%'`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('password_hash', 'text')
    .addColumn('roles', sql`text[]`, (c) =>
      c
        .notNull()
        .defaultTo(sql`'{member}'`)
        .check(sql`cardinality(roles) > 0 and roles <@ array['member','brewer_on_duty','treasurer','admin']::text[]`),
    )
    .addColumn('is_active', 'boolean', (c) => c.notNull().defaultTo(true))
    .addColumn('units', 'text', (c) =>
      c
        .notNull()
        .defaultTo('metric')
        .check(sql`units in ('metric','us')`),
    )
    .addColumn('last_login_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('app_user_email_key').unique().on('app_user').column('email').execute();

  await db.schema
    .createTable('user_token')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
    .addColumn('purpose', 'text', (c) => c.notNull().check(sql`purpose in ('invitation','password_reset')`))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('user_token_user_id_idx').on('user_token').column('user_id').execute();

  // The table connect-pg-simple reads and writes; created here so that every instance finds it.
  await db.schema
    .createTable('session')
    .addColumn('sid', 'varchar', (c) => c.primaryKey())
    .addColumn('sess', 'json', (c) => c.notNull())
    .addColumn('expire', sql`timestamp(6)`, (c) => c.notNull())
    .execute();
  await db.schema.createIndex('session_expire_idx').on('session').column('expire').execute();
  await sql`create index session_user_id_idx on session ((sess->>'userId'))`.execute(db);

  await db.schema
    .createTable('rate_limit')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('hits', 'integer', (c) => c.notNull())
    .addColumn('reset_at', 'timestamptz', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('audit_log')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('actor_id', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('subject_type', 'text', (c) => c.notNull())
    .addColumn('subject_id', 'text')
    .addColumn('detail', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('audit_log_subject_idx').on('audit_log').columns(['subject_type', 'subject_id']).execute();
  await db.schema.createIndex('audit_log_at_idx').on('audit_log').column('at').execute();

  await db.schema
    .createTable('setting')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('value', 'jsonb', (c) => c.notNull())
    .addColumn('updated_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('seed_run')
    .addColumn('name', 'text', (c) => c.primaryKey())
    .addColumn('ran_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['seed_run', 'setting', 'audit_log', 'rate_limit', 'session', 'user_token', 'app_user']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
