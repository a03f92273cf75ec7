/** Roles as the server names them, and how people read them. */
export const ROLES = ['admin', 'statistician', 'coordinator', 'investigator', 'monitor', 'sponsor'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Trial manager (admin)',
  statistician: 'Statistician',
  coordinator: 'Site coordinator',
  investigator: 'Site investigator',
  monitor: 'Committee member',
  sponsor: 'Sponsor',
};

export const hasAnyRole = (mine: readonly string[] | undefined, allowed: readonly Role[]) =>
  !!mine && mine.some((role) => (allowed as readonly string[]).includes(role));
