/** Starts one Orrery server process: database pool, HTTP listener, mail worker and scheduled jobs. */
import type { AddressInfo } from 'node:net';
import { pino, type Logger } from 'pino';
import { ConfigError, type Config } from './config.js';
import { createDb, type Db } from './db/knex.js';
import { runtimeRoleProblems } from './db/roles.js';
import { createApp, type AppParts } from './app.js';
import type { Express } from 'express';
import { startMailWorker, type MailWorker } from './mail/outbox.js';
import { answerClientError } from './http/client-error.js';
import { startJobs, type Jobs } from './jobs/index.js';

export type RunningServer = {
  url: string;
  port: number;
  db: Db;
  mail: MailWorker;
  jobs: Jobs;
  app: Express;
  routes: AppParts['routes'];
  close: () => Promise<void>;
};

export async function startServer(config: Config, logger: Logger = pino({ level: config.logLevel })): Promise<RunningServer> {
  const db = createDb(config.databaseUrl, { logger: { warn: (m) => logger.warn(m), error: (m) => logger.warn(m) } });
  if (config.production) {
    // The database's own protections (append-only triggers) hold only if the server cannot drop them.
    const problems = await runtimeRoleProblems(db).catch(async (error: unknown) => {
      await db.destroy();
      throw error;
    });
    if (problems.length > 0) {
      await db.destroy();
      throw new ConfigError(`Configuration problems:\n - ${problems.join('\n - ')}\n   Connect DATABASE_URL as a role with row rights only; migrations run as the owner (MIGRATION_DATABASE_URL, npm run migrate).`);
    }
  }
  const mail = startMailWorker(db, config, logger);
  const { app, routes, jobs: scheduledJobs, close: closeApp } = createApp(config, db, logger, mail);
  const jobs = startJobs(db, config, logger, mail, scheduledJobs);
  const server = app.listen(config.port, '127.0.0.1');
  server.on('clientError', answerClientError);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const port = (server.address() as AddressInfo).port;
  return {
    url: `http://localhost:${port}`,
    port,
    db,
    mail,
    jobs,
    app,
    routes,
    close: async () => {
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      await jobs.stop();
      await mail.stop();
      await closeApp();
      await db.destroy();
    },
  };
}
