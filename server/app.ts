/**
 * The composition root. Builds the Express application — security headers, logging, limits, the
 * one query-string rule, sessions, the Origin check, every route, the built client in production,
 * the one error handler — and names everything that is wired rather than called: every feature's
 * route list, every hook a feature's write sets off in another, and every scheduled job. Nothing
 * registers itself on import; what is not listed here does not run.
 */
import path from 'node:path';
import { existsSync } from 'node:fs';
import express, { type RequestHandler } from 'express';
import helmet from 'helmet';
import { rateLimit } from 'express-rate-limit';
import { pinoHttp } from 'pino-http';
import type { Logger } from 'pino';
import type { Config } from './config.js';
import type { Db } from './db/knex.js';
import { authRoutes, createOidcClient, type OidcClient } from './auth/index.js';
import { createSessionMiddleware } from './http/session.js';
import { mountRoutes, type Deps, type RouteSpec } from './http/routes.js';
import { apiNotFound, errorHandler } from './http/error-handler.js';
import { singleValuedQuery } from './http/query.js';
import type { Hooks } from './hooks.js';
import { weeklyDigestJob, type ScheduledJob } from './jobs/index.js';
import { healthRoutes } from './health/index.js';
import { meRoutes } from './me/index.js';
import { trialsRoutes } from './trials/index.js';
import { peopleRoutes } from './people/index.js';
import { designsRoutes } from './designs/index.js';
import { patientsRoutes } from './patients/index.js';
import { evaluationRoutes } from './evaluation/index.js';
import { assessmentsRoutes, rederiveAfterPatientWrite, rederiveTrialAfterSettingsChange } from './assessments/index.js';
import { dataCutsRoutes } from './data-cuts/index.js';
import { portfolioRoutes } from './portfolio/index.js';
import { accrualRoutes } from './accrual/index.js';
import { outboxRoutes } from './outbox/index.js';
import { auditRoutes } from './audit/index.js';
import { applySafetyAfterDesignSigned, safetyRoutes } from './safety/index.js';

/** Every route of the server, feature by feature: the one list the app mounts and the permission matrix walks. */
function routeList(oidc: OidcClient): RouteSpec[] {
  return [
    ...authRoutes(oidc),
    ...healthRoutes,
    ...meRoutes,
    ...trialsRoutes,
    ...peopleRoutes,
    ...designsRoutes,
    ...patientsRoutes,
    ...evaluationRoutes,
    ...assessmentsRoutes,
    ...safetyRoutes,
    ...dataCutsRoutes,
    ...portfolioRoutes,
    ...accrualRoutes,
    ...outboxRoutes,
    ...auditRoutes,
  ];
}

/** Who reacts, inside the same transaction, to another feature's writes. */
const hooks: Hooks = {
  // An enrolment or an entered outcome re-derives too, so a disagreement is flagged the moment it appears.
  patientWritten: [rederiveAfterPatientWrite],
  protocolSettingsChanged: [rederiveTrialAfterSettingsChange],
  // A design version signed with a safety rule is held against the events already recorded.
  designSigned: [applySafetyAfterDesignSigned],
};

/** The scheduled jobs every server process offers to run (each runs once per period across all processes). */
const scheduledJobs: ScheduledJob[] = [weeklyDigestJob];

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** A malformed Referer counts as no Referer (and so is refused), never as a server error. */
function refererOrigin(referer: string | undefined): string | undefined {
  if (!referer) return undefined;
  try {
    return new URL(referer).origin;
  } catch {
    return undefined;
  }
}

/** Cookie sessions need a second line of defence against cross-site requests: the Origin header. */
function originCheck(appOrigin: string): RequestHandler {
  return (req, res, next) => {
    if (!STATE_CHANGING.has(req.method)) return next();
    const origin = req.get('origin') ?? refererOrigin(req.get('referer'));
    if (origin === appOrigin) return next();
    res.status(403).json({ error: { code: 'bad_origin', message: 'This request did not come from the Orrery application.' } });
  };
}

export type AppParts = { app: express.Express; routes: RouteSpec[]; jobs: ScheduledJob[]; oidc: OidcClient; close: () => Promise<void> };

export function createApp(config: Config, db: Db, logger: Logger, mail: Deps['mail']): AppParts {
  const app = express();
  app.disable('x-powered-by');
  if (config.production) app.set('trust proxy', 1);

  app.use(
    pinoHttp({
      logger,
      redact: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'],
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      // A line per request names the request and its status, never whole header sets: cheaper, and nothing secret to redact.
      serializers: { req: (req) => ({ method: req.method, url: String(req.url).split('?')[0] }), res: (res) => ({ statusCode: res.statusCode }) },
    }),
  );
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
          ...(config.appOrigin.startsWith('https://') ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      strictTransportSecurity: config.appOrigin.startsWith('https://'),
    }),
  );

  const limiterOptions = { standardHeaders: 'draft-7' as const, legacyHeaders: false, windowMs: 60_000 };
  const limited = (limit: number, message: string) =>
    rateLimit({
      ...limiterOptions,
      limit,
      handler: (_req, res) => res.status(429).json({ error: { code: 'rate_limited', message } }),
    });
  app.use('/auth/login', limited(config.signInRateLimitPerMinute, 'Too many sign-in attempts. Wait a minute and try again.'));
  const apiLimiter = limited(config.rateLimitPerMinute, 'Too many requests. Wait a minute and try again.');
  // Load balancers poll the health route; it must never be throttled into looking down.
  app.use('/api', (req, res, next) => (req.path === '/health' ? next() : apiLimiter(req, res, next)));

  // Every route's query string, once for all: a parameter given twice or as a list or object is a 400 naming it.
  app.use(['/api', '/auth'], singleValuedQuery);

  const sessions = createSessionMiddleware(config, logger);
  const withSession: RequestHandler = (req, res, next) => (req.path === '/api/health' ? next() : sessions.middleware(req, res, next));
  app.use(['/api', '/auth'], withSession);
  app.use(['/api', '/auth'], originCheck(config.appOrigin));
  app.use('/api', express.json({ limit: '200kb' }));
  // Conditional GET: the tag is a hash of the very bytes this viewer receives, so a write or a change
  // in who may see what changes it; the browser must ask again each time (If-None-Match → 304) and
  // never share an answer with another user.
  app.set('etag', 'weak');
  app.use('/api', (req, res, next) => {
    if (req.method === 'GET') res.setHeader('Cache-Control', 'private, no-cache');
    next();
  });

  const oidc = createOidcClient(config);
  const routes = routeList(oidc);
  const router = express.Router();
  mountRoutes(router, routes, { db, config, hooks, mail });
  app.use(router);
  app.use('/api', apiNotFound);

  const clientDir = config.serveClientFrom;
  if (clientDir && existsSync(path.join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
    app.get('/{*rest}', (req, res, next) => {
      if (req.path.startsWith('/auth/')) return next();
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }
  app.use(errorHandler);
  return { app, routes, jobs: scheduledJobs, oidc, close: sessions.close };
}
