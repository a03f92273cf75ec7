/**
 * People & sites: the routes and the people store (sites, memberships, the users behind them).
 * Other features import this feature only through this file.
 */
export { countMonitors, decisionRecipients, findUserName, holdsRoleAtSite, insertMembership, memberEmails, sponsorRecipients, statisticianEmails } from './people.repository.js';
export { ownMembershipsJson } from './people.repository.js';
export type { OwnMembership, SponsorRecipient } from './people.repository.js';
export { trialManagerGrantExists } from './trial-managers.repository.js';
export { peopleRoutes } from './people.routes.js';
export { isTrialManager, membershipsOf } from './people.service.js';
