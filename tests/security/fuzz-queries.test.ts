/**
 * Property-based fuzzing of the query string of every read route in the running server's route
 * table, as each role it admits, with real ids of a fixture trial: hostile values, malformed
 * percent-encoding, keys given twice, and list or object syntax (about 1,500 requests in all,
 * spread over every route and role). Every answer must be below 500; a refusal must be in the JSON
 * error shape; a repeated, list or object parameter must be refused with 400 naming it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import fc from 'fast-check';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import { allowedRoles, fillPath, paramFiller, pathParams, readRoutes, routeLabel, unfillable } from '../support/fuzz-routes.js';
import { siteScopedParams } from '../support/fuzz-site-records.js';
import { hostileQuery, type RawQuery } from '../support/fuzz-queries.js';

const QUERY_BUDGET = 1_500;
const MIN_RUNS = 10;
const MAX_RUNS = 200;

let stack: Stack;
let trial: TrialFixture;
const sessions = {} as Record<RoleName, Session>;

beforeAll(async () => {
  stack = await startStack({ RATE_LIMIT_PER_MINUTE: '1000000' });
  trial = await createTrial(stack.db);
  for (const role of Object.keys(DEMO) as RoleName[]) sessions[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

async function send(session: Session, path: string, query: RawQuery) {
  const res = await request(stack.url).get(`${path}?${query.query}`).set('Cookie', session.cookie).timeout(20_000);
  return { status: res.status, body: res.body as { error?: { code?: unknown; message?: unknown; fields?: Record<string, string> } }, text: res.text ?? '' };
}

describe('fuzzing the query string of every read route', () => {
  it(`when about ${QUERY_BUDGET.toLocaleString('en')} hostile query strings reach every read route as every role it admits, then none is a 5xx, refusals are in the error shape and repeated or nested parameters get 400 naming them`, async () => {
    const routes = readRoutes(stack.server.routes, stack.config.production);
    const pairs = routes.flatMap((spec) => allowedRoles(spec).map((role) => ({ spec, role })));
    const runs = Math.min(MAX_RUNS, Math.max(MIN_RUNS, Math.ceil(QUERY_BUDGET / Math.max(1, pairs.length))));
    const fill = paramFiller(stack);
    const [firstSite, secondSite] = Object.keys(trial.siteIds);
    const ownSite: Partial<Record<RoleName, string>> = { coordinator: firstSite, investigator: secondSite };
    const byStatus = new Map<number, number>();

    for (const { spec, role } of pairs) {
      const ids: Record<string, string> = {};
      for (const name of pathParams(spec)) {
        if (unfillable(spec).includes(name)) ids[name] = '00000000-0000-4000-8000-000000000000';
        else if (siteScopedParams[name] && ownSite[role]) ids[name] = await siteScopedParams[name]({ stack, trial, site: ownSite[role], earlier: ids });
        else ids[name] = await fill(name, trial);
      }
      const path = fillPath(spec, ids);
      await fc.assert(
        fc.asyncProperty(hostileQuery, async (query) => {
          const res = await send(sessions[role], path, query);
          byStatus.set(res.status, (byStatus.get(res.status) ?? 0) + 1);
          const where = `${routeLabel(spec)} as ${role}, ${query.kind} ?${query.query.slice(0, 120)} → ${res.status} ${res.text.slice(0, 200)}`;
          if (res.status >= 500) throw new Error(`server error: ${where}`);
          if (query.refusedKey !== undefined) {
            if (res.status !== 400 || !res.body.error?.fields?.[query.refusedKey]) throw new Error(`not refused by name: ${where}`);
          }
          if (res.status >= 400 && (typeof res.body.error?.code !== 'string' || typeof res.body.error.message !== 'string')) {
            throw new Error(`not the error shape: ${where}`);
          }
        }),
        { numRuns: runs },
      );
    }
    console.info(`[fuzz] ${pairs.length} read route×role pairs (${runs} each); statuses ${JSON.stringify(Object.fromEntries(byStatus))}`);
    expect(pairs.length).toBeGreaterThan(20);
  }, 300_000);
});
