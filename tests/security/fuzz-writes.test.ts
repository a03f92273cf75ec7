/**
 * Property-based fuzzing of every write route in the running server's route table. Each route is
 * called by every role it admits, with real ids of a fixture trial (and, now and then, hostile
 * ids), and a few thousand hostile bodies in all (about 2,000 requests per run: the budget below
 * is spread over every route and role). Every answer must be a refusal in the JSON error shape —
 * never a 5xx — and a refused request must leave every table's row count unchanged (audit log
 * included). A body that a route happens to accept is allowed only if the write it made is audited.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import fc from 'fast-check';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import type { RouteSpec } from '../../server/http/routes.js';
import { IMPORT_COLUMNS } from '../../server/patients/patients.schema.js';
import { countChanges, tableCounts } from '../support/fuzz-counts.js';
import { allowedRoles, fillPath, paramFiller, pathParams, routeLabel, unfillable, writeRoutes } from '../support/fuzz-routes.js';
import { siteScopedParams } from '../support/fuzz-site-records.js';
import { HOSTILE_IDS, hostileJsonPayload, hostileUpload, type RawPayload, type UploadPayload } from '../support/fuzz-payloads.js';

/** Total requests aimed for across all routes and roles; each pair gets at least MIN_RUNS. */
const PAYLOAD_BUDGET = 2_000;
const MIN_RUNS = 25;
const MAX_RUNS = 400;
const REFUSALS = new Set([400, 401, 403, 404, 409, 413, 415]);
const ACCEPTED = new Set([200, 201, 204]);

let stack: Stack;
let trial: TrialFixture;
let origin: string;
const sessions = {} as Record<RoleName, Session>;

beforeAll(async () => {
  // Thousands of requests a minute: lift the per-client API limit, which has its own test.
  stack = await startStack({ RATE_LIMIT_PER_MINUTE: '1000000' });
  origin = new URL(stack.url).origin;
  trial = await createTrial(stack.db);
  for (const role of Object.keys(DEMO) as RoleName[]) sessions[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

type Outcome = { status: number; body: unknown; text: string };

async function send(session: Session, spec: RouteSpec, path: string, payload: RawPayload | UploadPayload): Promise<Outcome> {
  const test = request(stack.url)[spec.method](path).set('Cookie', session.cookie).set('Origin', origin).timeout(20_000);
  if ('field' in payload) {
    const res = await test.attach(payload.field, payload.content, { filename: payload.filename, contentType: payload.contentType });
    return { status: res.status, body: res.body, text: res.text };
  }
  if (payload.contentType) test.set('Content-Type', payload.contentType);
  const res = await test.send(payload.body as string);
  return { status: res.status, body: res.body, text: res.text };
}

/** The route's required fields, read from its answer to an empty body (its own 400 names them). */
async function requiredFields(session: Session, spec: RouteSpec, path: string): Promise<string[]> {
  const res = await send(session, spec, path, { kind: 'empty object', contentType: 'application/json', body: '{}' });
  const fields = (res.body as { error?: { fields?: Record<string, string> } })?.error?.fields ?? {};
  return [...new Set(Object.keys(fields).map((f) => f.split(/[.[]/)[0]).filter((f) => f && f !== '_'))];
}

const isUpload = (spec: RouteSpec) => (spec.before?.length ?? 0) > 0;

/** The columns each upload route reads, so some hostile files get past the header check to the rows. */
const UPLOAD_COLUMNS: Record<string, readonly string[]> = {
  'POST /api/trials/:trialId/patients/import': IMPORT_COLUMNS,
};

describe('fuzzing every write route', () => {
  it('when the route table is read, then the write routes to fuzz are listed and every path parameter has a fixture or is reported', () => {
    const routes = writeRoutes(stack.server.routes, stack.config.production);
    const missing = routes.filter((r) => unfillable(r).length > 0).map((r) => `${routeLabel(r)} (:${unfillable(r).join(', :')})`);
    console.info(`[fuzz] ${routes.length} write routes: ${routes.map(routeLabel).join(', ') || 'none yet'}`);
    if (missing.length > 0) console.info(`[fuzz] filled with random ids only (no fixture yet): ${missing.join('; ')}`);
    expect(routes.every((r) => allowedRoles(r).length > 0)).toBe(true);
  });

  it(`when about ${PAYLOAD_BUDGET.toLocaleString('en')} hostile payloads are sent to every write route by every role it admits, then each is refused in the error shape, none is a 5xx and a refusal writes nothing`, async () => {
    const routes = writeRoutes(stack.server.routes, stack.config.production);
    const pairs = routes.flatMap((spec) => allowedRoles(spec).map((role) => ({ spec, role })));
    const runs = Math.min(MAX_RUNS, Math.max(MIN_RUNS, Math.ceil(PAYLOAD_BUDGET / Math.max(1, pairs.length))));
    const fill = paramFiller(stack);
    // createTrial puts the coordinator at the first site and the investigator at the second.
    const [firstSite, secondSite] = Object.keys(trial.siteIds);
    const ownSite: Partial<Record<RoleName, string>> = { coordinator: firstSite, investigator: secondSite };
    const tally = { requests: 0, accepted: [] as string[], byStatus: new Map<number, number>(), notFound: new Map<string, number>() };
    let before = await tableCounts(stack.db);

    for (const { spec, role } of pairs) {
      const session = sessions[role];
      const realIds: Record<string, string> = {};
      for (const name of pathParams(spec)) {
        if (unfillable(spec).includes(name)) realIds[name] = '00000000-0000-4000-8000-000000000000';
        // Site roles reach records of their own site only: give them one there, so the body is what gets judged.
        else if (siteScopedParams[name] && ownSite[role]) realIds[name] = await siteScopedParams[name]({ stack, trial, site: ownSite[role], earlier: realIds });
        else realIds[name] = await fill(name, trial);
      }
      const realPath = fillPath(spec, realIds);
      const fields = isUpload(spec) ? ['file'] : await requiredFields(session, spec, realPath);
      const payloads: fc.Arbitrary<RawPayload | UploadPayload> = isUpload(spec)
        ? hostileUpload(fields[0], UPLOAD_COLUMNS[routeLabel(spec)])
        : hostileJsonPayload(fields);
      const hostilePath = fc.option(
        fc.record({ name: fc.constantFrom(...pathParams(spec), 'none'), id: fc.oneof(fc.constantFrom(...HOSTILE_IDS), fc.uuid()) }),
        { freq: 5 },
      );

      // Fixtures and the probe may write; from here the counts after one request are the counts before the next.
      before = await tableCounts(stack.db);
      await fc.assert(
        fc.asyncProperty(payloads, hostilePath, async (payload, swap) => {
          const path = swap && swap.name !== 'none' ? fillPath(spec, { ...realIds, [swap.name]: swap.id }) : realPath;
          const res = await send(session, spec, path, payload);
          const after = await tableCounts(stack.db);
          const changed = countChanges(before, after);
          const auditedWrite = after.audit_log !== before.audit_log;
          before = after;
          tally.requests += 1;
          tally.byStatus.set(res.status, (tally.byStatus.get(res.status) ?? 0) + 1);
          if (res.status === 404) tally.notFound.set(`${routeLabel(spec)} as ${role}`, (tally.notFound.get(`${routeLabel(spec)} as ${role}`) ?? 0) + 1);
          const where = `${routeLabel(spec)} as ${role}, ${payload.kind} → ${res.status} ${res.text.slice(0, 200)}`;
          if (ACCEPTED.has(res.status)) {
            tally.accepted.push(`${routeLabel(spec)} as ${role}: ${payload.kind}`);
            if (changed.length > 0 && !auditedWrite) throw new Error(`unaudited write: ${where} (${changed.join(', ')})`);
            return;
          }
          // The CSV imports answer 422 on purpose when rows of a well-formed file fail (nothing is imported).
          if (!REFUSALS.has(res.status) && !(res.status === 422 && isUpload(spec))) throw new Error(`unexpected status: ${where}`);
          const error = (res.body as { error?: { code?: unknown; message?: unknown } }).error;
          if (typeof error?.code !== 'string' || typeof error.message !== 'string') throw new Error(`not the error shape: ${where}`);
          if (changed.length > 0) throw new Error(`a refused request wrote: ${where} (${changed.join(', ')})`);
        }),
        { numRuns: runs },
      );
    }

    console.info(
      `[fuzz] ${tally.requests} requests over ${pairs.length} route×role pairs (${runs} each); statuses ${JSON.stringify(Object.fromEntries(tally.byStatus))}`,
    );
    // A pair answering mostly 404 is judged on its ids, not its bodies: list it so a missing fixture shows.
    const mostlyNotFound = [...tally.notFound].filter(([, n]) => n > runs / 2).map(([pair]) => pair);
    if (mostlyNotFound.length > 0) console.info(`[fuzz] mostly 404 (bodies not reached): ${mostlyNotFound.join('; ')}`);
    if (tally.accepted.length > 0) console.info(`[fuzz] accepted (audited) bodies: ${[...new Set(tally.accepted)].join('; ')}`);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(({} as Record<string, unknown>).isAdmin).toBeUndefined();
  }, 240_000);
});
