/**
 * Yup schemas for People & sites: global site records and a trial's memberships. Shared by the
 * routes and the client's forms, so this file imports nothing but Yup and the roles of auth/access.ts.
 */
import * as yup from 'yup';
import { ROLES, SITE_ROLES } from '../auth/access.js';

/** The site code is the prefix of its patients' study IDs. */
export const SITE_CODE = /^[A-Z0-9]{2,8}$/;

export const MEMBER_ROLES = ROLES;
/** Coordinators and investigators hold their role at one site. */
export const SITE_MEMBER_ROLES: readonly string[] = SITE_ROLES;

const version = yup.number().typeError('The record version is missing.').required('The record version is missing.').integer().min(1);

export const siteSchema = yup.object({
  code: yup
    .string()
    .trim()
    .required('Give the site a code.')
    .matches(SITE_CODE, '2 to 8 capital letters or digits (it starts every study ID at the site).'),
  name: yup.string().trim().required('Name the site.').max(200, 'At most 200 characters.'),
  country: yup.string().trim().required('Name the country.').max(100, 'At most 100 characters.'),
});
export type SiteInput = yup.InferType<typeof siteSchema>;

export const siteUpdateSchema = siteSchema.shape({ version });
export type SiteUpdateInput = yup.InferType<typeof siteUpdateSchema>;

const role = yup.string().required('Choose a role.').oneOf(MEMBER_ROLES, 'Choose one of the roles.');

/** Coordinators and investigators work at one site; every other role sees the whole trial. */
const siteForRole = yup
  .string()
  .transform((value: string) => (value === '' ? null : value))
  .nullable()
  .default(null)
  .when('role', {
    is: (r: string) => SITE_MEMBER_ROLES.includes(r),
    then: (s) => s.required('Coordinators and investigators need a site.').uuid('Choose a site from the list.'),
    otherwise: (s) => s.test('no-site', 'Only coordinators and investigators belong to a site.', (value) => value === null || value === undefined),
  });

export const membershipInviteSchema = yup.object({
  email: yup.string().trim().lowercase().required('Give the person’s e-mail address.').email('This is not an e-mail address.').max(254),
  role,
  siteId: siteForRole,
});
export type MembershipInviteInput = yup.InferType<typeof membershipInviteSchema>;

export const membershipUpdateSchema = yup.object({ role, siteId: siteForRole, version });
export type MembershipUpdateInput = yup.InferType<typeof membershipUpdateSchema>;
