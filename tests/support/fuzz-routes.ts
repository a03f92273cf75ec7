/**
 * Reading the running server's route table for the security suites: which routes write, which
 * roles may call them, and filling their path parameters with real ids (from matrix-params.ts) of
 * a chosen trial fixture.
 */
import type { RouteSpec } from '../../server/http/routes.js';
import type { Role } from '../../server/auth/access.js';
import { ROLES } from '../../server/auth/access.js';
import type { Stack } from './stack.js';
import type { TrialFixture } from './factories.js';
import { paramFixtures } from './matrix-params.js';

export const WRITE_METHODS = new Set<RouteSpec['method']>(['post', 'put', 'patch', 'delete']);

export const routeLabel = (spec: RouteSpec) => `${spec.method.toUpperCase()} ${spec.path}`;

export const pathParams = (spec: RouteSpec): string[] => [...spec.path.matchAll(/:(\w+)/g)].map((m) => m[1]);

/** State-changing API routes (the identity flow under /auth has its own tests). */
export function writeRoutes(routes: RouteSpec[], production = false): RouteSpec[] {
  return routes.filter((r) => WRITE_METHODS.has(r.method) && !r.path.startsWith('/auth/') && !(r.devOnly && production));
}

/** Reading API routes, every one of which takes a query string (the identity flow under /auth has its own tests). */
export function readRoutes(routes: RouteSpec[], production = false): RouteSpec[] {
  return routes.filter((r) => r.method === 'get' && r.path.startsWith('/api/') && !(r.devOnly && production));
}

/** The roles a route lets in (every role for signed-in routes). */
export function allowedRoles(spec: RouteSpec): Role[] {
  const { access } = spec;
  if (access.kind === 'public' || access.kind === 'signed-in') return [...ROLES];
  return [...access.roles];
}

/** The parameters of `spec` that no fixture can fill yet (reported, never guessed). */
export const unfillable = (spec: RouteSpec) => pathParams(spec).filter((p) => p !== 'trialId' && !paramFixtures[p]);

/** Real ids for every parameter of `spec`, created once per trial and parameter and reused. */
export function paramFiller(stack: Stack) {
  const cache = new Map<string, Promise<string>>();
  return async (name: string, trial: TrialFixture): Promise<string> => {
    if (name === 'trialId') return trial.trialId;
    const fixture = paramFixtures[name];
    if (!fixture) throw new Error(`no fixture for :${name}`);
    const key = `${trial.trialId}:${name}`;
    if (!cache.has(key)) cache.set(key, fixture({ stack, trial }));
    return cache.get(key) as Promise<string>;
  };
}

export function fillPath(spec: RouteSpec, values: Record<string, string>): string {
  return pathParams(spec).reduce((path, name) => path.replace(`:${name}`, encodeURIComponent(values[name])), spec.path);
}
