/** Roles come from the server's access module; here only how people read them. */
import type { Role } from '../../../server/auth/access';

export { ROLES, hasAnyRole, type Role } from '../../../server/auth/access';

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Trial manager (admin)',
  statistician: 'Statistician',
  coordinator: 'Site coordinator',
  investigator: 'Site investigator',
  monitor: 'Committee member',
  sponsor: 'Sponsor',
};
