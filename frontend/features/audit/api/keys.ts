/** The audit trail's queries. */
export const auditKeys = {
  all: ['audit'] as const,
  list: (query: object) => [...auditKeys.all, query] as const,
};
