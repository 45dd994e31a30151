/** Every keg query hangs under ['kegs']; a keg action invalidates it all. */
export const kegKeys = {
  all: ['kegs'] as const,
  list: (q: object) => [...kegKeys.all, 'list', q] as const,
  overdue: (q: object) => [...kegKeys.all, 'overdue', q] as const,
  board: () => [...kegKeys.all, 'tap-board'] as const,
  detail: (id: string) => [...kegKeys.all, 'detail', id] as const,
  history: (id: string, page: number) => [...kegKeys.all, 'detail', id, 'history', page] as const,
};
