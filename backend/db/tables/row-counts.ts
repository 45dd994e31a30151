import type { ColumnType } from 'kysely';

/**
 * The rows a long list's table holds, kept by triggers (`row_count_keep`): per table, group (the value of the
 * column its list filters by) and shard (the writer's backend); a total is the sum of a table's rows.
 */
export interface RowCountTable {
  table_name: 'booking' | 'audit_log' | 'sanitation_cycle';
  group_value: string;
  shard: number;
  /** bigint, read as a string by the driver. */
  n: ColumnType<string, number, number>;
}

export interface RowCountTables {
  row_count: RowCountTable;
}
