/**
 * The visibility rule as a table: for every role (and some unions of roles), what it sees of one
 * cohort's efficacy, with and without a released cut and a design that lets sponsors see response;
 * the projection of a payload; who may receive which mail; whose mail the Outbox shows.
 */
import { describe, expect, it } from 'vitest';
import type { Role } from '../../server/auth/access.js';
import {
  addressedTo,
  efficacyView,
  operationalSites,
  patientRecordSites,
  projectEfficacy,
  recipientRoles,
  seesEveryMessage,
  type CohortRelease,
} from '../../server/auth/visibility.js';

const SITES = ['site-a'];
const as = (...roles: Role[]) => ({ roles, siteIds: roles.some((r) => r === 'coordinator' || r === 'investigator') ? SITES : [] });

const PLAIN: CohortRelease = { sponsorSeesResponse: false, released: false };
const RELEASED: CohortRelease = { sponsorSeesResponse: false, released: true };
const OPEN: CohortRelease = { sponsorSeesResponse: true, released: false };

/** [roles, cohort] → what they see: live, released, own sites. Written out, not derived from the module. */
const TABLE: Array<[Role[], CohortRelease, { live: boolean; released: boolean; ownSites: boolean }]> = [
  [['statistician'], PLAIN, { live: true, released: false, ownSites: false }],
  [['statistician'], RELEASED, { live: true, released: true, ownSites: false }],
  [['monitor'], PLAIN, { live: true, released: false, ownSites: false }],
  [['monitor'], RELEASED, { live: true, released: true, ownSites: false }],
  [['coordinator'], PLAIN, { live: false, released: false, ownSites: true }],
  [['coordinator'], RELEASED, { live: false, released: true, ownSites: true }],
  [['coordinator'], OPEN, { live: true, released: false, ownSites: true }],
  [['investigator'], PLAIN, { live: false, released: false, ownSites: true }],
  [['investigator'], RELEASED, { live: false, released: true, ownSites: true }],
  [['admin'], PLAIN, { live: false, released: false, ownSites: false }],
  [['admin'], RELEASED, { live: false, released: false, ownSites: false }],
  [['admin'], OPEN, { live: false, released: false, ownSites: false }],
  [['sponsor'], PLAIN, { live: false, released: false, ownSites: false }],
  [['sponsor'], RELEASED, { live: false, released: true, ownSites: false }],
  [['sponsor'], OPEN, { live: true, released: false, ownSites: false }],
  // Several roles: the union.
  [['admin', 'sponsor'], RELEASED, { live: false, released: true, ownSites: false }],
  [['admin', 'coordinator'], PLAIN, { live: false, released: false, ownSites: true }],
  [['sponsor', 'statistician'], PLAIN, { live: true, released: false, ownSites: false }],
  [['coordinator', 'monitor'], RELEASED, { live: true, released: true, ownSites: true }],
];

describe('efficacyView', () => {
  it.each(TABLE)('when %j reads a cohort %j, then they see %j', (roles, cohort, expected) => {
    const view = efficacyView(as(...roles), cohort);
    expect({ live: view.live, released: view.released, ownSites: view.ownSiteIds.length > 0 }).toEqual(expected);
    expect(view.hiddenReason === undefined).toBe(expected.live);
  });

  it('when live figures are hidden, then the reason speaks to the viewer: site staff, sponsors, trial managers', () => {
    expect(efficacyView(as('coordinator'), PLAIN).hiddenReason).toMatch(/site staff/);
    expect(efficacyView(as('sponsor'), PLAIN).hiddenReason).toMatch(/No cut of this cohort has been released yet/);
    expect(efficacyView(as('sponsor'), RELEASED).hiddenReason).toMatch(/the data cut a committee decision released/);
    expect(efficacyView(as('admin'), RELEASED).hiddenReason).toMatch(/operational figures only/);
  });
});

describe('projectEfficacy', () => {
  const computed = { enrolled: 10, pending: 2, responders: 3, rate: { estimate: 0.375 }, path: [{ evaluable: 1, responders: 1 }] };
  const released = { cutAt: '2026-03-03T09:00:00.000Z', responders: 2 };
  const sites = [
    { siteId: 'site-a', responders: 1 },
    { siteId: 'site-b', responders: 2 },
  ];

  it('when live figures are hidden, then their keys are absent (not null) and a reason is given; operational keys stay', () => {
    const projected = projectEfficacy(efficacyView(as('sponsor'), PLAIN), computed, ['responders', 'rate', 'path'], { released: null, sites });
    expect(projected).toEqual({ enrolled: 10, pending: 2, efficacyHidden: expect.any(String) });
  });

  it('when a cut is released, then its figures carry the cut’s date; own-site counts keep the viewer’s sites only', () => {
    const projected = projectEfficacy(efficacyView(as('coordinator'), RELEASED), computed, ['responders', 'rate', 'path'], { released, sites });
    expect(projected.released).toEqual({ ...released, label: 'as of the data cut of 3 March 2026' });
    expect(projected.ownSites).toEqual([sites[0]]);
    expect(projected).not.toHaveProperty('responders');
  });

  it('when the viewer reads live figures, then the payload is whole and says nothing about hiding', () => {
    const projected = projectEfficacy(efficacyView(as('statistician'), PLAIN), computed, ['responders', 'rate', 'path'], { released: null, sites });
    expect(projected).toEqual(computed);
  });
});

describe('mail and the Outbox', () => {
  it('when a message carries live efficacy, then only the statistician and committee members may receive it', () => {
    expect(recipientRoles('live-efficacy', ['statistician', 'monitor', 'coordinator', 'sponsor', 'admin'])).toEqual(['statistician', 'monitor']);
  });

  it('when a message carries released figures or a decision, then everyone but the trial manager may receive it', () => {
    expect(recipientRoles('released-efficacy', ['coordinator', 'investigator', 'sponsor', 'admin'])).toEqual(['coordinator', 'investigator', 'sponsor']);
    expect(recipientRoles('operational', ['admin', 'sponsor'])).toEqual(['admin', 'sponsor']);
  });

  it('when the Outbox is read, then a trial manager sees every message and anyone else only theirs (any letter case)', () => {
    expect(seesEveryMessage(['admin'])).toBe(true);
    expect(seesEveryMessage(['statistician', 'sponsor'])).toBe(false);
    expect(addressedTo(['Cora.Coord@tessaly.test'], 'cora.coord@tessaly.test')).toBe(true);
    expect(addressedTo(['sam.stat@tessaly.test'], 'cora.coord@tessaly.test')).toBe(false);
  });
});

describe('site scopes', () => {
  it('when patient records are read, then the statistician and committee read every site, site staff their own, and a second role never widens that', () => {
    expect(patientRecordSites(as('statistician'))).toBe('all');
    expect(patientRecordSites(as('monitor'))).toBe('all');
    expect(patientRecordSites(as('coordinator'))).toEqual(SITES);
    expect(patientRecordSites(as('coordinator', 'sponsor'))).toEqual(SITES);
    expect(patientRecordSites(as('coordinator', 'admin'))).toEqual(SITES);
    expect(patientRecordSites(as('sponsor'))).toEqual([]);
  });

  it('when operational rows are read, then site staff see their own sites and every other role all of them', () => {
    expect(operationalSites(as('coordinator'))).toEqual(SITES);
    expect(operationalSites(as('coordinator', 'sponsor'))).toBe('all');
    expect(operationalSites(as('admin'))).toBe('all');
  });
});
