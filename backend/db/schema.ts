import type { Insertable, Selectable, Updateable } from 'kysely';
import type { AccountTables, AppUserTable } from './tables/accounts.ts';
import type { BatchTables } from './tables/batches.ts';
import type { BillingTables } from './tables/billing.ts';
import type { CellarTables } from './tables/cellar.ts';
import type { CellarOperationsTables } from './tables/cellar-operations.ts';
import type { InspectionTables } from './tables/inspections.ts';
import type { ReminderTables } from './tables/reminders.ts';
import type { RowCountTables } from './tables/row-counts.ts';

/**
 * The typed database: one interface of tables per capability, each in backend/db/tables/.
 * A capability adds its file there and one name to this list.
 */
export interface DB extends AccountTables, CellarTables, BatchTables, BillingTables, CellarOperationsTables, InspectionTables, ReminderTables, RowCountTables {}

export type AppUserRow = Selectable<AppUserTable>;
export type NewAppUserRow = Insertable<AppUserTable>;
export type AppUserRowUpdate = Updateable<AppUserTable>;
