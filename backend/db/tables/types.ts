import type { ColumnType } from 'kysely';

/** A timestamptz: read as Date, written as Date or ISO string. */
export type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;
/** A json/jsonb column: written as a JSON string or value. */
export type Json = ColumnType<unknown, unknown, unknown>;
/** A numeric column (parsed to number in database.ts). */
export type Numeric = ColumnType<number, number | string, number | string>;
