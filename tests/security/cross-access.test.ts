/**
 * Cross-trial and cross-site access, generic over the route table. Every route that names a record
 * besides the trial is called with a record of another trial (under this trial's id), with a
 * record of a trial the caller is not in (routes reached through the record alone), and — for
 * site roles — with a record of a site they do not work at. Each answer must be a bare 404 that
 * names nothing of the other record, and nothing may be written. Parameters without a fixture
 * are listed and skipped.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Test } from 'supertest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import type { RouteSpec } from '../../server/http/routes.js';
import { SITE_ROLES } from '../../server/auth/access.js';
import { countChanges, tableCounts } from '../support/fuzz-counts.js';
import { WRITE_METHODS, allowedRoles, fillPath, paramFiller, pathParams, routeLabel, unfillable } from '../support/fuzz-routes.js';
import { validBodies } from '../support/fuzz-samples.js';
import { siteScopedParams } from '../support/fuzz-site-records.js';

let stack: Stack;
/** The caller's trial (A), another trial they also belong to (B), and one they are not in (C). */
let home: TrialFixture;
let other: TrialFixture;
let stranger: TrialFixture;
const sessions = {} as Record<RoleName, Session>;

beforeAll(async () => {
  stack = await startStack({ RATE_LIMIT_PER_MINUTE: '100000' });
  home = await createTrial(stack.db, { sites: ['XA1', 'XA2'] });
  other = await createTrial(stack.db, { sites: ['XB1', 'XB2'] });
  stranger = await createTrial(stack.db, { sites: ['XC1'], members: [{ email: 'zed.admin@tessaly.test', role: 'admin' }] });
  for (const role of Object.keys(DEMO) as RoleName[]) sessions[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

/** Routes that name a record besides the trial (global records such as sites are not trial-bound). */
const recordRoutes = (routes: RouteSpec[]) =>
  routes.filter((r) => r.access.kind === 'trial' && pathParams(r).some((p) => p !== 'trialId'));

function call(role: RoleName, spec: RouteSpec, path: string): Test {
  const session = sessions[role];
  if (spec.method === 'get') return session.get(path);
  const body = validBodies[routeLabel(spec)]?.() ?? {};
  return spec.method === 'delete' ? session.delete(path).send(body) : session[spec.method](path, body);
}

/** Everything about the other trial that must not appear in an answer. */
async function secretsOf(trial: TrialFixture, ids: string[]): Promise<string[]> {
  const studyIds: Array<{ study_id: string }> = await stack.db('patients').where({ trial_id: trial.trialId }).select('study_id');
  return [...ids, trial.trialId, trial.code, ...studyIds.map((p) => p.study_id)];
}

type Attempt = { label: string; role: RoleName; spec: RouteSpec; path: string; secrets: string[] };

async function judge(attempts: Attempt[]): Promise<string[]> {
  const problems: string[] = [];
  for (const attempt of attempts) {
    const before = WRITE_METHODS.has(attempt.spec.method) ? await tableCounts(stack.db) : undefined;
    const res = await call(attempt.role, attempt.spec, attempt.path);
    const where = `${routeLabel(attempt.spec)} as ${attempt.role} with ${attempt.label}`;
    if (res.status !== 404) problems.push(`${where} → ${res.status} ${res.text.slice(0, 160)}`);
    else if (Object.keys(res.body ?? {}).join() !== 'error' || Object.keys(res.body.error).some((k) => !['code', 'message'].includes(k)))
      problems.push(`${where}: 404 carries more than the error: ${res.text.slice(0, 160)}`);
    const leaked = attempt.secrets.filter((s) => res.text.includes(s));
    if (leaked.length > 0) problems.push(`${where}: the answer names ${leaked.join(', ')}`);
    if (before) {
      const changed = countChanges(before, await tableCounts(stack.db));
      if (changed.length > 0) problems.push(`${where} wrote: ${changed.join(', ')}`);
    }
  }
  return problems;
}

describe('cross-trial and cross-site access', () => {
  it('when the route table is read, then routes whose record parameters have no fixture are listed (and skipped)', () => {
    const routes = recordRoutes(stack.server.routes);
    const skipped = routes.filter((r) => unfillable(r).length > 0);
    console.info(`[cross-access] ${routes.length} routes name a record besides the trial`);
    if (skipped.length > 0) console.info(`[cross-access] skipped, no fixture yet: ${skipped.map((r) => `${routeLabel(r)} (:${unfillable(r).join(', :')})`).join('; ')}`);
    const withoutBody = routes.filter((r) => WRITE_METHODS.has(r.method) && !validBodies[routeLabel(r)]);
    if (withoutBody.length > 0) console.info(`[cross-access] writes judged with an empty body (no sample yet): ${withoutBody.map(routeLabel).join('; ')}`);
    expect(routes.length).toBeGreaterThan(0);
  });

  it("when a route under this trial is given another trial's record, then every role that may call it gets a bare 404 and nothing is written", async () => {
    const fill = paramFiller(stack);
    const attempts: Attempt[] = [];
    for (const spec of recordRoutes(stack.server.routes).filter((r) => pathParams(r).includes('trialId') && unfillable(r).length === 0)) {
      const values: Record<string, string> = {};
      for (const name of pathParams(spec)) values[name] = name === 'trialId' ? home.trialId : await fill(name, other);
      const secrets = await secretsOf(other, Object.entries(values).filter(([n]) => n !== 'trialId').map(([, v]) => v));
      for (const role of allowedRoles(spec)) attempts.push({ label: "another trial's record", role, spec, path: fillPath(spec, values), secrets });
    }
    expect(attempts.length).toBeGreaterThan(0);
    expect(await judge(attempts)).toEqual([]);
  }, 120_000);

  it('when a route reached through a record alone is given the record of a trial the caller is not in, then every role gets a bare 404', async () => {
    const fill = paramFiller(stack);
    const attempts: Attempt[] = [];
    for (const spec of recordRoutes(stack.server.routes).filter((r) => !pathParams(r).includes('trialId') && unfillable(r).length === 0)) {
      const values: Record<string, string> = {};
      for (const name of pathParams(spec)) values[name] = await fill(name, stranger);
      const secrets = await secretsOf(stranger, Object.values(values));
      for (const role of Object.keys(DEMO) as RoleName[]) attempts.push({ label: "a record of a trial they are not in", role, spec, path: fillPath(spec, values), secrets });
    }
    console.info(`[cross-access] ${attempts.length} attempts through records alone`);
    expect(await judge(attempts)).toEqual([]);
  }, 120_000);

  it('when a coordinator or investigator is given a record of a site they do not work at, then a bare 404 and nothing is written', async () => {
    const [firstSite, secondSite] = Object.keys(home.siteIds);
    // createTrial puts the coordinator at the first site and the investigator at the second.
    const foreignSite: Record<string, string> = { coordinator: secondSite, investigator: firstSite };
    const routes = recordRoutes(stack.server.routes).filter(
      (r) => pathParams(r).includes('trialId') && pathParams(r).some((p) => siteScopedParams[p]) && unfillable(r).length === 0,
    );
    const attempts: Attempt[] = [];
    for (const spec of routes) {
      for (const role of allowedRoles(spec).filter((r): r is RoleName => SITE_ROLES.includes(r))) {
        const values: Record<string, string> = {};
        for (const name of pathParams(spec)) {
          if (name === 'trialId') values[name] = home.trialId;
          else if (siteScopedParams[name]) values[name] = await siteScopedParams[name]({ stack, trial: home, site: foreignSite[role], earlier: values });
          else values[name] = await paramFiller(stack)(name, home);
        }
        const studyIds: Array<{ study_id: string }> = await stack.db('patients').where({ site_id: home.siteIds[foreignSite[role]] }).select('study_id');
        const secrets = [...Object.entries(values).filter(([n]) => siteScopedParams[n]).map(([, v]) => v), ...studyIds.map((p) => p.study_id)];
        attempts.push({ label: `a record at ${foreignSite[role]}`, role, spec, path: fillPath(spec, values), secrets });
      }
    }
    console.info(`[cross-access] ${attempts.length} cross-site attempts over ${routes.length} site-scoped routes`);
    expect(attempts.length).toBeGreaterThan(0);
    expect(await judge(attempts)).toEqual([]);
  }, 120_000);

  it('when the same reads are made with records of the right trial and site, then they answer 200 (the refusals above are about ownership, not broken fixtures)', async () => {
    const ownSite: Record<string, string> = { coordinator: Object.keys(other.siteIds)[0], investigator: Object.keys(other.siteIds)[1] };
    const problems: string[] = [];
    const reads = recordRoutes(stack.server.routes).filter((r) => r.method === 'get' && pathParams(r).includes('trialId') && unfillable(r).length === 0);
    for (const spec of reads) {
      for (const role of allowedRoles(spec)) {
        const values: Record<string, string> = {};
        for (const name of pathParams(spec)) {
          if (name === 'trialId') values[name] = other.trialId;
          else if (siteScopedParams[name] && ownSite[role]) values[name] = await siteScopedParams[name]({ stack, trial: other, site: ownSite[role], earlier: values });
          else values[name] = await paramFiller(stack)(name, other);
        }
        const res = await call(role, spec, fillPath(spec, values));
        if (res.status !== 200) problems.push(`${routeLabel(spec)} as ${role} → ${res.status} ${res.text.slice(0, 120)}`);
      }
    }
    expect(reads.length).toBeGreaterThan(0);
    expect(problems).toEqual([]);
  }, 120_000);
});
