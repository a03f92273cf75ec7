/**
 * The route-permission matrix: every route of the server × every role (plus signed-out and
 * non-member callers) answers exactly as the route table declares. Adding a route without a
 * table entry fails the first test.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { randomUUID } from 'node:crypto';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import { paramFixtures } from '../support/matrix-params.js';
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

async function pathFor(spec: RouteSpec): Promise<string> {
  let path = spec.path;
  for (const [, name] of spec.path.matchAll(/:(\w+)/g)) {
    const value = name === 'trialId' ? trial.trialId : paramFixtures[name] ? await paramFixtures[name]({ stack, trial }) : randomUUID();
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
});
