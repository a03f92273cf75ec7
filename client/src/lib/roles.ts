/** Roles come from the server's access module, and read as the words module says them. */
export { ROLES, hasAnyRole, type Role } from '../../../server/auth/access';
export { ROLE_LABELS } from '../../../server/words';
