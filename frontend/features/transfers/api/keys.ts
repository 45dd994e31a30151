/** Every transfer query hangs under ['transfers']. */
export const transferKeys = {
  all: ['transfers'] as const,
  candidates: () => [...transferKeys.all, 'candidates'] as const,
};
