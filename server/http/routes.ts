/**
 * The route-permission table. Every route of the server is declared as data — method, path, who
 * may call it, handler — in its feature's *.routes.ts, listed by the composition root (app.ts) and
 * mounted by `mountRoutes`. The same declarations drive the authorisation middleware and the
 * permission-matrix test, so they cannot drift apart. Handlers hand services an `Actor`
 * (`actorOf`), never the request.
 *
 * Access kinds:
 * - public: anyone, signed in or not;
 * - signed-in: any signed-in user (the handler filters what it returns by the user's memberships);
 * - role-anywhere: the user must hold one of `roles` on at least one trial (global records such
 *   as sites, or creating a new trial), else 403; for admin, a trial-manager grant made from the
 *   command line on an empty installation counts too;
 * - trial: the user must hold one of `roles` on the trial named by `:trialId`, or by the trial
 *   that `trialOf` finds for the route's other parameters (a data cut, say). A user who is not a
 *   member of that trial gets 404 (its existence does not leak); a member in another role gets 403.
 */
import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import { preparedStatement, readPrepared, type Db, type FirstRead, type PreparedStatement } from '../db/knex.js';
import { sessionStillStored } from './session.js';
import type { Config } from '../config.js';
import type { Hooks } from '../hooks.js';
import { ForbiddenError, NotFoundError, UnauthenticatedError } from './errors.js';
import { isUuid, type Actor, type Role, type SessionUser, type TrialAccess } from '../auth/access.js';
import type { SigningSession } from '../signatures/signatures.js';

export type TrialOf = (db: Db, params: Record<string, string>) => Promise<string | undefined>;

export type Access =
  | { kind: 'public' }
  | { kind: 'signed-in' }
  | { kind: 'role-anywhere'; roles: readonly Role[] }
  | { kind: 'trial'; roles: readonly Role[]; trialOf?: TrialOf };

/** What every handler gets from the composition root (server/app.ts). */
export type Deps = {
  db: Db;
  config: Config;
  hooks: Hooks;
  /** Sends mail a committed transaction queued now, rather than at the worker's next poll. */
  mail: { kick: () => void };
};
export type Handler = (req: Request, res: Response, deps: Deps) => Promise<void> | void;

export type RouteSpec = {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  access: Access;
  handler: Handler;
  /** Middleware that must run before the handler but after authorisation (uploads). */
  before?: RequestHandler[];
  /** Routes under development tooling are mounted only outside production. */
  devOnly?: boolean;
  /**
   * The handler confirms an unconfirmed session itself, in its first statement (through
   * `firstReadOf`, or `sessionStillStored` selected beside its data and then `settleSession`),
   * instead of the authorisation spending a statement on it. Signed-in reads (GET) only: a write
   * has its session confirmed by the authorisation, before it can write anything.
   */
  confirmsSession?: boolean;
};

declare module 'express-serve-static-core' {
  interface Request {
    trialAccess?: TrialAccess;
  }
}

export function requireTrialAccess(req: Request): TrialAccess {
  if (!req.trialAccess) throw new Error('route is not declared with trial access');
  return req.trialAccess;
}

export function requireUser(req: Request): SessionUser {
  if (!req.user) throw new UnauthenticatedError();
  return req.user;
}

/** The actor of a trial route: the signed-in user with their access to the route's trial. */
export function actorOf(req: Request): Actor {
  return { user: requireUser(req), access: requireTrialAccess(req) };
}

/** The browser session asking to sign, for a service that records a signature (it consumes that session's password entry). */
export function signingSessionOf(req: Request): SigningSession {
  return { userId: requireUser(req).id, sessionId: req.sessionID };
}

/**
 * Settles a session the request took from this process's earlier reading (server/http/session.ts)
 * with what a statement found: still stored, the request goes on as confirmed; gone or expired,
 * it is refused and the session forgotten.
 */
export function settleSession(req: Request, stillStored: boolean): void {
  const unconfirmed = req.unconfirmedSession;
  if (!unconfirmed) return;
  req.unconfirmedSession = undefined;
  if (stillStored) return;
  unconfirmed.forget();
  req.user = undefined;
  throw new UnauthenticatedError();
}

const sessionStored = preparedStatement('orrery_session_stored', (db, sessionId: string, nowSeconds: number) =>
  db.select({ stored: sessionStillStored(db, sessionId, nowSeconds) }),
);

/** Confirms an unconfirmed session by a statement of its own, for routes whose first statement does not. */
async function confirmSession(req: Request, db: Db): Promise<void> {
  if (!req.unconfirmedSession) return;
  const [row] = await readPrepared<{ stored: boolean }>(db, sessionStored(db, req.unconfirmedSession.id, Date.now() / 1000));
  settleSession(req, row.stored);
}

// Each statement's confirming form, by statement name: the session check (sessionStored) first, the
// statement's own placeholders moved up past the check's.
const confirmingTexts = new Map<string, string>();
const confirmingText = (check: PreparedStatement, { name, text }: PreparedStatement): string => {
  let confirming = confirmingTexts.get(name);
  if (confirming === undefined) {
    const shifted = text.replace(/\$(\d+)/g, (_, n: string) => `$${Number(n) + check.values.length}`);
    confirming = `select s.stored as session_stored, r.* from (${check.text}) s left join lateral (select true as read_row, q.* from (${shifted}) q) r on true`;
    confirmingTexts.set(name, confirming);
  }
  return confirming;
};

/**
 * The route's first read, with an unconfirmed session's confirmation folded into the same
 * statement (a named statement either way): the session is settled before any row is returned.
 * A route declared `confirmsSession` hands this to the service that makes its first read.
 */
export function firstReadOf(req: Request, db: Db): FirstRead {
  return async <R>(statement: PreparedStatement): Promise<R[]> => {
    const unconfirmed = req.unconfirmedSession;
    if (!unconfirmed) return readPrepared<R>(db, statement);
    const check = sessionStored(db, unconfirmed.id, Date.now() / 1000);
    type Confirming = { session_stored: boolean; read_row: true | null };
    const rows = await readPrepared<R & Confirming>(db, {
      name: `${statement.name}_confirming`,
      text: confirmingText(check, statement),
      values: [...check.values, ...statement.values],
    });
    settleSession(req, rows[0].session_stored);
    return rows.filter((row) => row.read_row).map(({ session_stored: _stored, read_row: _row, ...row }) => row as unknown as R);
  };
}

const trialAccessRows = preparedStatement('orrery_trial_access', (db, trialId: string, userId: string) =>
  db('memberships as m')
    .leftJoin('trial_data_versions as v', 'v.trial_id', 'm.trial_id')
    .where({ 'm.trial_id': trialId, 'm.user_id': userId, 'm.status': 'active' })
    .select('m.role', 'm.site_id', 'v.version'),
);

/** The user's roles and sites on the trial, with the trial's data version (which the summaries kept in memory are keyed by), in one statement with the session's confirmation. */
async function loadTrialAccess(db: Db, req: Request, userId: string, trialId: string): Promise<TrialAccess | undefined> {
  const rows = await firstReadOf(req, db)<{ role: Role; site_id: string | null; version: string | null }>(trialAccessRows(db, trialId, userId));
  if (rows.length === 0) return undefined;
  return {
    trialId,
    roles: [...new Set(rows.map((row) => row.role))],
    siteIds: [...new Set(rows.filter((row) => row.site_id).map((row) => row.site_id as string))],
    dataVersion: Number(rows[0].version ?? 0),
  };
}

/** An active membership in one of `roles` on any trial; a trial-manager grant (the first manager of an installation) counts as admin. */
async function holdsRoleAnywhere(db: Db, userId: string, roles: readonly Role[]): Promise<boolean> {
  const membership = await db('memberships')
    .where({ user_id: userId, status: 'active' })
    .whereIn('role', roles as Role[])
    .first('id');
  if (membership) return true;
  return roles.includes('admin') && Boolean(await db('trial_manager_grants').where({ user_id: userId }).first('id'));
}

function authorise(spec: RouteSpec, deps: Deps): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    try {
      const { access } = spec;
      // A trial route's access read confirms the session in the same statement; a route marked so confirms it in its own.
      if (access.kind !== 'trial' && !(access.kind === 'signed-in' && spec.confirmsSession)) await confirmSession(req, deps.db);
      if (access.kind === 'public') return next();
      if (!req.user) throw new UnauthenticatedError();
      if (access.kind === 'signed-in') return next();
      if (access.kind === 'role-anywhere') {
        if (!(await holdsRoleAnywhere(deps.db, req.user.id, access.roles))) throw new ForbiddenError('Only a trial manager (admin) can do this.');
        return next();
      }
      const params = req.params as Record<string, string>;
      const trialId = access.trialOf ? await access.trialOf(deps.db, params) : params.trialId;
      if (!isUuid(trialId)) {
        await confirmSession(req, deps.db);
        throw new NotFoundError('The trial');
      }
      const trialAccess = await loadTrialAccess(deps.db, req, req.user.id, trialId);
      if (!trialAccess) throw new NotFoundError('The trial');
      if (!trialAccess.roles.some((role) => access.roles.includes(role))) throw new ForbiddenError();
      req.trialAccess = trialAccess;
      next();
    } catch (error) {
      next(error);
    }
  };
}

export function mountRoutes(router: Router, specs: RouteSpec[], deps: Deps) {
  for (const spec of specs) {
    if (spec.devOnly && deps.config.production) continue;
    if (spec.confirmsSession && spec.method !== 'get') throw new Error(`${spec.method.toUpperCase()} ${spec.path}: only a read may confirm the session in its own first statement`);
    router[spec.method](spec.path, authorise(spec, deps), ...(spec.before ?? []), async (req, res, next) => {
      try {
        await spec.handler(req, res, deps);
        if (req.unconfirmedSession) throw new Error(`${spec.method.toUpperCase()} ${spec.path} is declared to confirm the session but answered without doing so`);
      } catch (error) {
        // A handler that failed before its first read (bad input, say) still answers a gone session with 401.
        next(req.unconfirmedSession ? await confirmSession(req, deps.db).then(() => error, (refusal: unknown) => refusal) : error);
      }
    });
  }
}
