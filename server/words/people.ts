/** Roles as people say them (mail, refusals): never the code, "monitor" least of all. */
import type { Role } from '../auth/access.js';

export const ROLE_WORDS: Record<Role, string> = {
  admin: 'trial manager (admin)',
  statistician: 'trial statistician',
  coordinator: 'site coordinator',
  investigator: 'site investigator',
  monitor: 'member of the data monitoring committee',
  sponsor: 'sponsor',
};
