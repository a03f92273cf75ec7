/** Roles as people say them: never the code, "monitor" least of all (to a practitioner a monitor is the sponsor's site monitor). */
import type { Role } from '../auth/access.js';

/** A role as a label (lists, the role picker, the Trial overview). */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Trial manager',
  statistician: 'Trial statistician',
  coordinator: 'Site coordinator',
  investigator: 'Site investigator',
  monitor: 'Committee member',
  sponsor: 'Sponsor',
};

/** A role inside a sentence (mail, refusals): "you are invited to TSY-201 as a committee member". */
export const ROLE_WORDS: Record<Role, string> = {
  admin: 'trial manager',
  statistician: 'trial statistician',
  coordinator: 'site coordinator',
  investigator: 'site investigator',
  monitor: 'committee member (data monitoring committee)',
  sponsor: 'sponsor',
};
