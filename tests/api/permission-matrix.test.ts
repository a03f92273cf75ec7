/**
 * The route-permission matrix: every route of the server × every role (plus signed-out and
 * non-member callers) answers exactly as the route table declares. Adding a route without a
 * table entry fails the first test. Per field, every GET route × every role shows exactly the
 * efficacy the visibility rule allows, on a trial with nothing released, one whose cut a committee
 * decision released, and one whose design lets sponsors see response (tests/support/efficacy-matrix.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { randomUUID } from 'node:crypto';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import { paramFixtures } from '../support/matrix-params.js';
import { arrangeCohort, matrixCut, outcomes, releaseCutDirectly } from '../support/data-cut-factories.js';
import { keysDeep } from '../support/accrual-factories.js';
import { EFFICACY_KEYS, EFFICACY_ROUTES, OWN_SITE, SEES, TRIAL_KINDS, type TrialKind } from '../support/efficacy-matrix.js';
import type { Session } from '../support/sign-in.js';
import type { RouteSpec } from '../../server/http/routes.js';

let stack: Stack;
let trial: TrialFixture;
const sessions = {} as Record<RoleName | 'outsider', Session>;
const ROLES = Object.keys(DEMO) as RoleName[];

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  for (const role of ROLES) sessions[role] = await stack.signIn(DEMO[role]);
  sessions.outsider = await stack.signIn('nina.newcomer@tessaly.test');
}, 120_000);
afterAll(async () => stack?.close());

async function pathFor(spec: RouteSpec, trialId = trial.trialId): Promise<string> {
  let path = spec.path;
  for (const [, name] of spec.path.matchAll(/:(\w+)/g)) {
    const value = name === 'trialId' ? trialId : paramFixtures[name] ? await paramFixtures[name]({ stack, trial }) : randomUUID();
    path = path.replace(`:${name}`, value);
  }
  return path;
}

function call(session: Session | undefined, spec: RouteSpec, path: string) {
  const origin = new URL(stack.url).origin;
  const method = spec.method;
  const test = session
    ? (method === 'get' ? session.get(path) : method === 'delete' ? session.delete(path) : session[method](path, {}))
    : request(stack.url)[method](path).set('Origin', origin);
  return test.redirects(0);
}

describe('route-permission matrix', () => {
  it('when the Express router is read, then every mounted route is in the route table and vice versa', () => {
    const mounted = new Set<string>();
    const stackLayers = (stack.server.app as unknown as { router: { stack: Array<{ route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: unknown[] } }> } }).router.stack;
    const walk = (layers: typeof stackLayers) => {
      for (const layer of layers) {
        if (layer.route) for (const method of Object.keys(layer.route.methods)) mounted.add(`${method} ${layer.route.path}`);
        else if (layer.handle?.stack) walk(layer.handle.stack as typeof stackLayers);
      }
    };
    walk(stackLayers);
    const declared = new Set(stack.server.routes.filter((r) => !(r.devOnly && stack.config.production)).map((r) => `${r.method} ${r.path}`));
    const spaFallback = [...mounted].filter((r) => r.includes('{*rest}'));
    expect([...mounted].filter((r) => !declared.has(r) && !spaFallback.includes(r))).toEqual([]);
    expect([...declared].filter((r) => !mounted.has(r))).toEqual([]);
  });

  it('when each route is called by each role, signed out and by a non-member, then the answer matches the table', async () => {
    const problems: string[] = [];
    for (const spec of stack.server.routes) {
      if (spec.access.kind === 'public') continue;
      const path = await pathFor(spec);
      const label = `${spec.method.toUpperCase()} ${spec.path}`;
      const anonymous = await call(undefined, spec, path);
      if (anonymous.status !== 401) problems.push(`${label} signed out → ${anonymous.status}, expected 401`);
      if (spec.access.kind === 'signed-in') {
        for (const role of ROLES) {
          const res = await call(sessions[role], spec, path);
          if ([401, 403].includes(res.status) || res.status >= 500) problems.push(`${label} ${role} → ${res.status}`);
        }
        continue;
      }
      if (spec.access.kind === 'role-anywhere') {
        for (const role of [...ROLES, 'outsider' as const]) {
          const res = await call(sessions[role], spec, path);
          const allowed = role !== 'outsider' && spec.access.roles.includes(role);
          if (allowed && ([401, 403].includes(res.status) || res.status >= 500)) problems.push(`${label} ${role} → ${res.status}, expected access`);
          if (!allowed && res.status !== 403) problems.push(`${label} ${role} → ${res.status}, expected 403`);
        }
        continue;
      }
      const outsider = await call(sessions.outsider, spec, path);
      if (outsider.status !== 404) problems.push(`${label} non-member → ${outsider.status}, expected 404`);
      for (const role of ROLES) {
        const res = await call(sessions[role], spec, path);
        const allowed = spec.access.roles.includes(role);
        if (allowed && ([401, 403].includes(res.status) || res.status >= 500)) problems.push(`${label} ${role} → ${res.status}, expected access`);
        if (!allowed && res.status !== 403) problems.push(`${label} ${role} → ${res.status}, expected 403`);
      }
    }
    expect(problems).toEqual([]);
  }, 180_000);

  it('when each GET route is read by each role, then exactly the efficacy fields the visibility rule allows are present — per field, not only per status', async () => {
    const trials: Record<TrialKind, TrialFixture> = {
      unreleased: trial,
      released: await createTrial(stack.db),
      open: await createTrial(stack.db),
    };
    await matrixCut(stack.db, trial);
    await arrangeCohort(stack.db, trials.released, { patients: { SA: outcomes(3, 10), SB: outcomes(1, 4) } });
    await releaseCutDirectly(stack.db, trials.released);
    await arrangeCohort(stack.db, trials.open, { design: { sponsorSeesResponse: true }, patients: { SA: outcomes(2, 3), SB: outcomes(1, 3) } });
    const problems: string[] = [];
    const efficacyIn = (value: unknown) => EFFICACY_KEYS.filter((key) => keysDeep(value).has(key));

    for (const spec of stack.server.routes.filter((r) => r.method === 'get' && r.access.kind !== 'public')) {
      const label = `GET ${spec.path}`;
      const entry = EFFICACY_ROUTES[`get ${spec.path}`];
      if (!entry) {
        problems.push(`${label} is not in tests/support/efficacy-matrix.ts: say what it shows of efficacy`);
        continue;
      }
      if (entry.kind === 'frozen-cut') {
        const roles = spec.access.kind === 'trial' ? [...spec.access.roles].sort() : [];
        if (JSON.stringify(roles) !== JSON.stringify(['monitor', 'statistician'])) problems.push(`${label} admits ${roles.join(', ')}: a frozen cut is the statistician's and the committee's`);
        continue;
      }
      // A route reached through the trial alone is read on each fixture trial; others on the matrix trial.
      const onlyTrial = [...spec.path.matchAll(/:(\w+)/g)].every(([, name]) => name === 'trialId');
      const kinds: TrialKind[] = entry.kind === 'projected' || (onlyTrial && spec.path.includes(':trialId')) ? TRIAL_KINDS : ['unreleased'];
      for (const kind of kinds) {
        const path = await pathFor(spec, trials[kind].trialId);
        for (const role of ROLES) {
          const res = await call(sessions[role], spec, path);
          if (res.status !== 200) continue;
          const where = `${label} ${role} on the ${kind} trial`;
          const text = res.text ?? '';
          if (entry.kind === 'efficacy-for') {
            const found = efficacyIn(res.body);
            if (!entry.roles.includes(role) && found.length > 0) problems.push(`${where} carries ${found.join(', ')}`);
          } else if (entry.kind === 'patient-records') {
            const own = OWN_SITE[role];
            const other = own && Object.keys(trial.siteIds).find((site) => site !== own);
            if (other && text.includes(`${other}-`)) problems.push(`${where} shows patients of site ${other}`);
          } else if (entry.kind === 'projected') {
            const { live, released } = SEES[role][kind];
            const cohorts = entry.cohorts(res.body, trials[kind].trialId);
            if (cohorts.length === 0) problems.push(`${where} has no cohort`);
            for (const cohort of cohorts) {
              const liveKeys = entry.live.filter((key) => key in cohort);
              if (live && liveKeys.length !== entry.live.length) problems.push(`${where} lacks live ${entry.live.filter((k) => !liveKeys.includes(k)).join(', ')}`);
              if (!live && liveKeys.length > 0) problems.push(`${where} carries live ${liveKeys.join(', ')}`);
              if (live === 'efficacyHidden' in cohort) problems.push(`${where}: efficacyHidden ${live ? 'present beside live figures' : 'missing'}`);
              if ('released' in cohort !== released) problems.push(`${where}: released figures ${released ? 'missing' : 'present'}`);
              const ownSites = entry.ownSites && OWN_SITE[role] !== undefined;
              if ('ownSites' in cohort !== ownSites) problems.push(`${where}: own-site counts ${ownSites ? 'missing' : 'present'}`);
              if (ownSites && (cohort.ownSites as Array<{ siteCode: string }>).some((site) => site.siteCode !== OWN_SITE[role])) problems.push(`${where}: another site's counts`);
              if (!live) {
                const { released: _released, ownSites: _own, ...rest } = cohort;
                const leaked = efficacyIn(rest);
                if (leaked.length > 0) problems.push(`${where} carries ${leaked.join(', ')} outside the released and own-site parts`);
              }
            }
          } else if (entry.kind === 'digest') {
            const preview = res.body.preview as { text: string } | null;
            if (role !== 'sponsor') {
              if (preview !== null) problems.push(`${where}: a digest for someone who sponsors nothing`);
              continue;
            }
            const section = (code: string) => preview?.text.split('\n\n').find((block) => block.startsWith(code)) ?? '';
            const expected: Record<TrialKind, RegExp> = { unreleased: /Response figures: not shown/, released: /Response as of the data cut of /, open: /Response \(live\)/ };
            for (const other of TRIAL_KINDS) {
              const block = section((await stack.db('trials').where({ id: trials[other].trialId }).first('code')).code);
              if (!expected[other].test(block)) problems.push(`${where}: the ${other} trial's section does not match ${expected[other]}`);
              for (const wrong of TRIAL_KINDS.filter((k) => k !== other)) if (expected[wrong].test(block)) problems.push(`${where}: the ${other} trial's section matches ${expected[wrong]}`);
            }
          } else {
            const mail = [...res.body.received.map((m: { to: string[] }) => m.to), ...res.body.queued.map((m: { to: string }) => [m.to])] as string[][];
            const foreign = mail.filter((to) => !to.includes(DEMO[role]));
            if (role !== 'admin' && foreign.length > 0) problems.push(`${where} shows ${foreign.length} messages addressed to others`);
          }
        }
      }
    }
    expect(problems).toEqual([]);
  }, 300_000);
});
