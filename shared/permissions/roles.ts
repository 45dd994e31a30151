export const roles = ['member', 'brewer_on_duty', 'treasurer', 'admin'] as const;
export type Role = (typeof roles)[number];

export const roleLabels: Record<Role, string> = {
  member: 'Member',
  brewer_on_duty: 'Brewer on duty',
  treasurer: 'Treasurer',
  admin: 'Admin',
};

/** The person a request acts for: only what the rules read. */
export interface Actor {
  id: string;
  roles: readonly Role[];
}
