import { type Kysely, sql } from 'kysely';

/**
 * Exact row counts of the long lists, kept by triggers in the transaction that adds or removes the rows, so an
 * unfiltered list's total is a sum of a few small rows instead of a read of the whole table.
 * - One row per table, group and shard: the group is the value of the column a list filters by (a booking's
 *   state, an audit row's subject type, a cycle's outcome), and the shard is the writing backend's process id
 *   modulo 64, so concurrent writers add to different rows instead of queueing on one. A total is the sum of a
 *   table's rows (of some groups), read with the same snapshot rules as the table itself: a rolled-back
 *   transaction leaves no trace in either.
 * - Statement triggers with transition tables: one statement that adds or changes many rows (an import, the
 *   bookings' state pass) writes each touched group once, in group order. An update that moves no row to another
 *   group writes nothing.
 * - The counts start from the rows already there: creating the triggers locks each table against writes until
 *   the migration commits, so none is missed or counted twice.
 */
const kept: { table: string; groupBy: string }[] = [
  { table: 'booking', groupBy: 'state' },
  { table: 'audit_log', groupBy: 'subject_type' },
  { table: 'sanitation_cycle', groupBy: 'outcome' },
];

export async function up(db: Kysely<any>): Promise<void> {
  await sql`create table row_count (
    table_name text not null,
    group_value text not null,
    shard int not null check (shard >= 0),
    n bigint not null,
    primary key (table_name, group_value, shard)
  ) with (fillfactor = 50)`.execute(db);
  // TG_ARGV[0]: the column whose value names the group.
  await sql`create function row_count_keep() returns trigger language plpgsql as $$
    declare
      grp text := format('%I::text', TG_ARGV[0]);
      changes text;
    begin
      if TG_OP = 'TRUNCATE' then
        delete from row_count where table_name = TG_TABLE_NAME;
        return null;
      end if;
      changes := case TG_OP
        when 'INSERT' then format('select %s as g, 1 as d from new_rows', grp)
        when 'DELETE' then format('select %s as g, -1 as d from old_rows', grp)
        else format('select %s as g, 1 as d from new_rows union all select %s, -1 from old_rows', grp, grp)
      end;
      execute format(
        'insert into row_count as k (table_name, group_value, shard, n)
         select $1, g, $2, sum(d) from (%s) c group by g having sum(d) <> 0 order by g
         on conflict (table_name, group_value, shard) do update set n = k.n + excluded.n', changes)
      using TG_TABLE_NAME, pg_backend_pid() % 64;
      return null;
    end
  $$`.execute(db);
  for (const { table, groupBy } of kept) {
    const t = sql.table(table);
    const arg = sql.lit(groupBy);
    await sql`create trigger ${sql.raw(`${table}_count_insert`)} after insert on ${t} referencing new table as new_rows
      for each statement execute function row_count_keep(${arg})`.execute(db);
    await sql`create trigger ${sql.raw(`${table}_count_delete`)} after delete on ${t} referencing old table as old_rows
      for each statement execute function row_count_keep(${arg})`.execute(db);
    await sql`create trigger ${sql.raw(`${table}_count_update`)} after update on ${t} referencing old table as old_rows new table as new_rows
      for each statement execute function row_count_keep(${arg})`.execute(db);
    await sql`create trigger ${sql.raw(`${table}_count_truncate`)} after truncate on ${t} for each statement execute function row_count_keep(${arg})`.execute(
      db,
    );
    await sql`insert into row_count (table_name, group_value, shard, n)
      select ${table}, ${sql.ref(groupBy)}::text, 0, count(*) from ${t} group by ${sql.ref(groupBy)}`.execute(db);
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const { table } of kept) {
    for (const event of ['insert', 'delete', 'update', 'truncate'])
      await sql`drop trigger if exists ${sql.raw(`${table}_count_${event}`)} on ${sql.table(table)}`.execute(db);
  }
  await sql`drop function if exists row_count_keep()`.execute(db);
  await sql`drop table if exists row_count`.execute(db);
}
