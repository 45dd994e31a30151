import { type Kysely, sql } from 'kysely';

/** A plan remembers what its checked line was made of, so its line type is shown as it was checked. */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('carbonation_plan')
    .addColumn('line_material', 'text', (c) => c.check(sql`line_material in ('vinyl','polyethylene','barrier','stainless')`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('carbonation_plan').dropColumn('line_material').execute();
}
