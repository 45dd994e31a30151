/** The development mailbox's queries. */
export const mailboxKeys = {
  all: ['mailbox'] as const,
  list: (query: object) => [...mailboxKeys.all, 'list', query] as const,
  probe: () => [...mailboxKeys.all, 'probe'] as const,
};
