/** Every carbonation query hangs under ['carbonation']. */
export const carbonationKeys = {
  all: ['carbonation'] as const,
  keg: (kegId: string) => [...carbonationKeys.all, 'keg', kegId] as const,
  lowerDue: () => [...carbonationKeys.all, 'lower-due'] as const,
};
