/** Batch queries hang under ['batches']; the reports across batches have keys of their own. */
export const batchKeys = {
  all: ['batches'] as const,
  lists: () => [...batchKeys.all, 'list'] as const,
  list: (query: object) => [...batchKeys.lists(), query] as const,
  detail: (id: string) => [...batchKeys.all, 'detail', id] as const,
  readings: (id: string, query: object) => [...batchKeys.detail(id), 'readings', query] as const,
  trace: (id: string) => [...batchKeys.detail(id), 'trace'] as const,
  traceReport: (from: string, to: string) => ['trace-report', { from, to }] as const,
  productionRecords: (from: string, to: string) => ['production-records', { from, to }] as const,
};
