/**
 * The session middleware: sessions live in PostgreSQL so any server process can serve any request.
 * Every request reads its session (one indexed row), so a sign-out or a removed session holds at
 * once in every process. The idle timeout rolls with each request, but the stored expiry is pushed
 * forward at most once per TOUCH_INTERVAL_MS per session instead of with a write on every request;
 * the cookie still rolls on every response.
 */
import session, { type SessionData } from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import pg from 'pg';
import type { RequestHandler } from 'express';
import type { Logger } from 'pino';
import type { Config } from '../config.js';
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

export const SESSION_COOKIE = 'orrery.sid';

const IDLE_TIMEOUT_MS = 8 * 60 * 60 * 1000;
/** A stored session may expire this much earlier than its cookie says; in return an active session costs one write a minute, not one per request. */
export const TOUCH_INTERVAL_MS = 60_000;

type Callback = (error?: unknown) => void;

export function createSessionMiddleware(config: Config, logger: Logger): { middleware: RequestHandler; close: () => Promise<void> } {
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 10, connectionTimeoutMillis: 2000 });
  pool.on('error', () => {
    // Idle clients dropped by a restarting database are replaced on the next checkout.
  });
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
  const middleware: RequestHandler = (req, res, next) =>
    sessions(req, res, (error?: unknown) => {
      const expires = req.session?.cookie.expires;
      if (expires) loadedExpiry.set(req.session, expires.getTime());
      next(error);
    });
  return {
    middleware,
    close: async () => {
      store.close();
      await pool.end();
    },
  };
}
