import { sql, type SelectQueryBuilder } from 'kysely';
import type { Page } from '../../shared/schemas/pagination.ts';
import type { Database } from '../db/database.ts';
import type { RowCountTable } from '../db/tables/row-counts.ts';

/** The page a list asks for, as every list query schema gives it (`shared/schemas/pagination.ts`). */
export interface PageRequest {
  page: number;
  pageSize: number;
}

/** A sort request checked against a list's allow-list: the key a client may send, and the SQL column it means. */
export interface SortRequest<K extends string> {
  sort: K;
  order: 'asc' | 'desc';
}

/**
 * A `LIKE`/`ILIKE` pattern that finds `text` anywhere, with `%`, `_` and the escape character taken literally
 * (PostgreSQL's default escape is the backslash).
 */
export function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** A condition: `text` stands anywhere in one of `columns` (case-insensitive, `%` and `_` taken literally). */
export function containsAny(columns: readonly string[], text: string) {
  const like = containsPattern(text);
  return sql<boolean>`(${sql.join(
    columns.map((c) => sql`${sql.ref(c)} ilike ${like}`),
    sql` or `,
  )})`;
}

/**
 * Orders a query by a column from the list's allow-list (`columns` maps what a client may send to the SQL
 * expression), nulls last either way, then by `tieBreaker` (ascending unless `tieOrder` says otherwise) so
 * pages never repeat or skip a row.
 */
export function orderByAllowed<DB, TB extends keyof DB, O, K extends string>(
  qb: SelectQueryBuilder<DB, TB, O>,
  columns: Readonly<Record<K, string>>,
  { sort, order }: SortRequest<K>,
  tieBreaker = 'id',
  tieOrder: 'asc' | 'desc' = 'asc',
): SelectQueryBuilder<DB, TB, O> {
  const column = columns[sort];
  return qb.orderBy(sql.ref(column), (ob) => (order === 'desc' ? ob.desc().nullsLast() : ob.asc().nullsLast())).orderBy(sql.ref(tieBreaker), tieOrder);
}

/** The groups of a kept count a total covers: every group, only those `in`, or all but those `notIn`. */
export interface KeptGroups {
  in?: readonly string[];
  notIn?: readonly string[];
}

/**
 * The exact number of rows of `table` (in the groups asked for), summed from the counts its triggers keep in
 * `row_count` in the transaction that writes the rows: a few small rows read instead of the whole table.
 */
export async function keptCount(db: Database, table: RowCountTable['table_name'], groups: KeptGroups = {}): Promise<number> {
  let q = db
    .selectFrom('row_count')
    .select(sql<number>`coalesce(sum(n), 0)::int`.as('total'))
    .where('table_name', '=', table);
  if (groups.in) q = q.where(sql<boolean>`group_value = any(${[...groups.in]}::text[])`);
  if (groups.notIn) q = q.where(sql<boolean>`group_value <> all(${[...groups.notIn]}::text[])`);
  return (await q.executeTakeFirstOrThrow()).total;
}

/**
 * One page of a filtered query and the count of all its rows, run side by side.
 * `base` carries the filters (and the joins they need) and selects nothing; `rows` adds the selection and the
 * order, and may add joins that only show a row (an inner join to a required row never changes the count).
 * `keptTotal`, when a list's filters are only what its table's kept count is grouped by, gives the same count
 * from `keptCount()` instead.
 */
export async function paginate<DB, TB extends keyof DB, O, RowDB = DB, RowTB extends keyof RowDB = keyof RowDB>(
  base: SelectQueryBuilder<DB, TB, object>,
  rows: (qb: SelectQueryBuilder<DB, TB, object>) => SelectQueryBuilder<RowDB, RowTB, O>,
  { page, pageSize }: PageRequest,
  keptTotal?: () => Promise<number>,
): Promise<{ rows: O[]; total: number }> {
  const counted = async () => ((await base.select(sql<number>`count(*)::int`.as('total')).executeTakeFirstOrThrow()) as { total: number }).total;
  const [total, list] = await Promise.all([
    (keptTotal ?? counted)(),
    rows(base)
      .limit(pageSize)
      .offset((page - 1) * pageSize)
      .execute(),
  ]);
  return { rows: list, total };
}

/** The page a list endpoint answers: the rows turned into items, with the count and the page asked for. */
export function pageOf<R, T>({ rows, total }: { rows: R[]; total: number }, toItem: (row: R) => T, { page, pageSize }: PageRequest): Page<T> {
  return { items: rows.map(toItem), total, page, pageSize };
}

/** The page of a list whose rows are ids: its items are what `views` makes of those ids, in the page's order. */
export async function pageOfViews<T>(
  { rows, total }: { rows: { id: string }[]; total: number },
  views: (ids: string[]) => Promise<T[]>,
  { page, pageSize }: PageRequest,
): Promise<Page<T>> {
  return { items: await views(rows.map((r) => r.id)), total, page, pageSize };
}
