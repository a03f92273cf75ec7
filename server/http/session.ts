/**
 * The session middleware: sessions live in PostgreSQL so any server process can serve any request,
 * and every request is judged against the stored session, so a sign-out or a removed session holds
 * at once in every process.
 *
 * Two ways in:
 * - Reads the session in full (express-session with the PostgreSQL store): everything under /auth
 *   (sign-in, the password entered for a signature, sign-out: the only code that reads or changes
 *   the session's contents), and any request whose session this process has not read in the last
 *   TOUCH_INTERVAL_MS.
 * - A request under /api (a read or a write) of a signed-in session this process read less than
 *   TOUCH_INTERVAL_MS ago takes the user from that reading and is marked unconfirmed. The route's
 *   authorisation confirms it before anything is answered or written: folded into the route's
 *   first statement (the trial access read, /api/me, the Portfolio's and trial list's roles and
 *   versions), or else by a one-row check of its own (server/http/routes.ts).
 *   A session gone or expired is refused (401) and forgotten. Only who the session belongs to is
 *   taken from the earlier reading, and that never changes within a session (a sign-in as someone
 *   else makes a new session).
 *
 * The idle timeout rolls with use, but the stored expiry is pushed forward at most once per
 * TOUCH_INTERVAL_MS per session instead of with a write on every request; the cookie rolls with it.
 */
import session, { type SessionData } from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import pg from 'pg';
import { parse as parseCookies } from 'cookie';
import { unsign } from 'cookie-signature';
import type { Knex } from 'knex';
import type { Request, RequestHandler } from 'express';
import type { Logger } from 'pino';
import type { Config } from '../config.js';
import type { SessionUser } from '../auth/access.js';
import type { SigningIntent } from '../signatures/signatures.js';

declare module 'express-session' {
  interface SessionData {
    userId: string;
    email: string;
    name: string | null;
    idToken: string;
    /**
     * A sign-in under way. With `signing`, it is a password entry for one signature: the intent
     * and when it was asked for (ms since the epoch), so an older authentication is refused.
     */
    login: {
      state: string;
      nonce: string;
      codeVerifier: string;
      returnTo: string;
      signing?: { intent: SigningIntent; requestedAt: number };
    };
  }
}

declare module 'express-serve-static-core' {
  interface Request {
    /** The signed-in user, from the stored session. */
    user?: SessionUser;
    /** Set when the user came from this process's earlier reading of the session: the route must confirm the session is still stored (`sessionStillStored`). */
    unconfirmedSession?: { id: string; forget: () => void };
  }
}

export const SESSION_COOKIE = 'orrery.sid';

const IDLE_TIMEOUT_MS = 8 * 60 * 60 * 1000;
/**
 * How long a process answers from its reading of a session, and how far the stored expiry may lag
 * behind: a stored session may expire up to twice this much earlier than eight hours after its last
 * use. In return an active session costs one full read and one write a minute, not one per request.
 */
export const TOUCH_INTERVAL_MS = 60_000;

/** How many signed-in sessions a process remembers reading; the least recently read go first. */
const KNOWN_SESSIONS = 20_000;

type Callback = (error?: unknown) => void;

/**
 * Whether the session is still stored and unexpired at `nowSeconds` (seconds since the epoch), as
 * an SQL expression a route's first statement selects (so confirming an unconfirmed session costs
 * no round trip of its own).
 */
export function sessionStillStored(db: Knex, sessionId: string, nowSeconds: number): Knex.Raw {
  return db.raw('exists(select 1 from session where sid = ? and expire >= to_timestamp(?))', [sessionId, nowSeconds]);
}

/** The session id the request's cookie carries, if its signature holds. */
function signedSessionId(req: Request, secret: string): string | undefined {
  const header = req.headers.cookie;
  if (!header) return undefined;
  const value = parseCookies(header)[SESSION_COOKIE];
  if (!value?.startsWith('s:')) return undefined;
  const sid = unsign(value.slice(2), secret);
  return sid === false ? undefined : sid;
}

export function createSessionMiddleware(config: Config, logger: Logger): { middleware: RequestHandler; close: () => Promise<void> } {
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 10, connectionTimeoutMillis: 2000 });
  pool.on('error', () => {
    // Idle clients dropped by a restarting database are replaced on the next checkout.
  });
  // Signed-in sessions this process has read in full, by id: whose they are and when they were read.
  const known = new Map<string, { user: SessionUser; readAt: number }>();
  const forget = (sid: string) => known.delete(sid);
  const remember = (sid: string, user: SessionUser) => {
    known.delete(sid);
    known.set(sid, { user, readAt: Date.now() });
    if (known.size > KNOWN_SESSIONS) known.delete(known.keys().next().value as string);
  };
  const PgStore = connectPgSimple(session);
  // The stored expiry of each session as this request loaded it (express-session hands the same object to touch).
  const loadedExpiry = new WeakMap<object, number>();
  class ThrottledPgStore extends PgStore {
    /**
     * Every request reads its session: the read is a named statement, which PostgreSQL parses and
     * plans once per connection instead of on every request. The store's own read runs until its
     * pruning of expired sessions is scheduled (it arms that timer).
     */
    override get(sid: string, callback: (error: unknown, session?: SessionData | null) => void): void {
      if (!(this as { pruneTimer?: unknown }).pruneTimer) return super.get(sid, callback);
      pool.query<{ sess: SessionData | string }>({ name: 'orrery_session_read', text: 'select sess from session where sid = $1 and expire >= to_timestamp($2)', values: [sid, Date.now() / 1000] }).then(
        ({ rows }) => {
          if (rows.length === 0) return callback(null, null);
          const { sess } = rows[0];
          try {
            callback(null, typeof sess === 'string' ? (JSON.parse(sess) as SessionData) : sess);
          } catch {
            this.destroy(sid, (error) => callback(error));
          }
        },
        (error: unknown) => callback(error),
      );
    }

    override set(sid: string, sess: SessionData, callback?: Callback): void {
      forget(sid);
      super.set(sid, sess, callback);
    }

    override destroy(sid: string, callback?: Callback): void {
      forget(sid);
      super.destroy(sid, callback);
    }

    override touch(sid: string, sess: SessionData, callback?: Callback): void {
      const expires = sess.cookie.expires?.getTime();
      const loaded = loadedExpiry.get(sess);
      if (expires === undefined || (loaded !== undefined && expires - loaded < TOUCH_INTERVAL_MS)) {
        callback?.();
        return;
      }
      // The expiry column and the cookie kept inside the session move together, in one statement that leaves the rest of the session alone.
      pool
        .query(`update session set expire = to_timestamp($1 / 1000.0), sess = jsonb_set(sess::jsonb, '{cookie,expires}', to_jsonb($2::text))::json where sid = $3`, [
          expires,
          new Date(expires).toISOString(),
          sid,
        ])
        .then(
          () => callback?.(),
          (error: unknown) => callback?.(error),
        );
    }
  }
  const store = new ThrottledPgStore({
    pool,
    tableName: 'session',
    createTableIfMissing: false,
    pruneSessionInterval: 15 * 60,
    // The store's own failures (a database outage, a shutdown mid-request) belong in the server log.
    errorLog: (...args: unknown[]) => logger.warn({ err: args.map(String).join(' ') }, 'session store error'),
  });
  const sessions = session({
    name: SESSION_COOKIE,
    secret: config.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: config.production,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.appOrigin.startsWith('https://'),
      maxAge: IDLE_TIMEOUT_MS,
      path: '/',
    },
  });
  const readInFull: RequestHandler = (req, res, next) =>
    sessions(req, res, (error?: unknown) => {
      const expires = req.session?.cookie.expires;
      if (expires) loadedExpiry.set(req.session, expires.getTime());
      const { userId, email, name } = req.session ?? {};
      if (userId && email) {
        req.user = { id: userId, email, name: name ?? null };
        remember(req.sessionID, req.user);
      }
      next(error);
    });
  const middleware: RequestHandler = (req, res, next) => {
    if (req.originalUrl.startsWith('/api/')) {
      const sid = signedSessionId(req, config.sessionSecret);
      const reading = sid === undefined ? undefined : known.get(sid);
      if (sid !== undefined && reading && Date.now() - reading.readAt < TOUCH_INTERVAL_MS) {
        req.sessionID = sid;
        req.user = reading.user;
        req.unconfirmedSession = { id: sid, forget: () => forget(sid) };
        return next();
      }
    }
    readInFull(req, res, next);
  };
  return {
    middleware,
    close: async () => {
      store.close();
      await pool.end();
    },
  };
}
