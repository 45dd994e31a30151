/** Every sanitation query hangs under ['sanitation']. */
export const sanitationKeys = {
  all: ['sanitation'] as const,
  status: (q: object) => [...sanitationKeys.all, 'status', q] as const,
  cycles: (q: object) => [...sanitationKeys.all, 'cycles', q] as const,
  cycle: (id: string) => [...sanitationKeys.all, 'cycle', id] as const,
};
