import { sql, type RawBuilder } from 'kysely';
import type { ChargeContext } from './types.ts';

/** Stands in for "no member" when a preview asks for an empty list of members (`in ()` is not SQL). */
const noMember = '00000000-0000-0000-0000-000000000000';

/** The members a source bills when the context names some: those, or none at all for an empty list. */
export const chargedMembers = (ctx: ChargeContext): string[] => (ctx.memberIds?.length ? ctx.memberIds : [noMember]);

/** The member column names one of the members the context bills (every member when it names none). */
export function chargedMember(ctx: ChargeContext, column: string): RawBuilder<boolean> {
  return ctx.memberIds ? sql<boolean>`${sql.ref(column)} in (${sql.join(chargedMembers(ctx))})` : sql<boolean>`true`;
}

/** The co-op's day of a timestamp column (an SQL `date`), in the context's time zone. */
export const dayOf = (ctx: ChargeContext, column: string): RawBuilder<string> => sql<string>`(${sql.ref(column)} at time zone ${ctx.timeZone})::date`;

/** The co-op's day of a timestamp column as 'YYYY-MM-DD'. */
export function localDay<T extends string | null = string>(ctx: ChargeContext, column: string): RawBuilder<T> {
  return sql<T>`(${dayOf(ctx, column)})::text`;
}

/** The timestamp column falls on one of the period's days (from its first day up to the next period's), in the co-op's time zone. */
export function dayInPeriod(ctx: ChargeContext, column: string): RawBuilder<boolean> {
  return sql<boolean>`(${dayOf(ctx, column)} >= ${ctx.first}::date and ${dayOf(ctx, column)} < ${ctx.next}::date)`;
}

/**
 * A span of use from one timestamp column to another (null: still going) shares a day with the
 * period. Its days run from the start's day up to the end's day, and a span inside one day uses that day.
 */
export function spanInPeriod(ctx: ChargeContext, start: string, end: string): RawBuilder<boolean> {
  return sql<boolean>`(${dayOf(ctx, start)} < ${ctx.next}::date and (${sql.ref(end)} is null or greatest(${dayOf(ctx, end)}, ${dayOf(ctx, start)} + 1) > ${ctx.first}::date))`;
}
