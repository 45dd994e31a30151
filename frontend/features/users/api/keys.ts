/** Every query about people hangs under ['users']. */
export const userKeys = {
  all: ['users'] as const,
  lists: () => [...userKeys.all, 'list'] as const,
  list: (query: object) => [...userKeys.lists(), query] as const,
  memberOptions: () => [...userKeys.all, 'member-options'] as const,
  billableMembers: () => [...userKeys.all, 'billable-members'] as const,
};
