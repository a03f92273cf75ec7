/** The session middleware: sessions live in PostgreSQL so any server process can serve any request. */
import session from 'express-session';
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

export function createSessionMiddleware(config: Config, logger: Logger): { middleware: RequestHandler; close: () => Promise<void> } {
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 5, connectionTimeoutMillis: 2000 });
  pool.on('error', () => {
    // Idle clients dropped by a restarting database are replaced on the next checkout.
  });
  const PgStore = connectPgSimple(session);
  const store = new PgStore({
    pool,
    tableName: 'session',
    createTableIfMissing: false,
    pruneSessionInterval: 15 * 60,
    // The store's own failures (a database outage, a shutdown mid-request) belong in the server log.
    errorLog: (...args: unknown[]) => logger.warn({ err: args.map(String).join(' ') }, 'session store error'),
  });
  const middleware = session({
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
      maxAge: 8 * 60 * 60 * 1000,
      path: '/',
    },
  });
  return {
    middleware,
    close: async () => {
      store.close();
      await pool.end();
    },
  };
}
