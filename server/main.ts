/** Production entry point: configuration from the environment, one server process. */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { pino } from 'pino';
import { loadConfig, ConfigError } from './config.js';
import { startServer } from './server.js';

const logger = pino({ level: process.env.LOG_LEVEL ?? 'info' });

try {
  const config = loadConfig({
    SERVE_CLIENT_FROM: path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../dist/client'),
    ...process.env,
  });
  const server = await startServer(config, logger);
  logger.info(`Orrery listening on ${config.appOrigin} (port ${server.port})`);
  const shutdown = async () => {
    await server.close();
    process.exit(0);
  };
  process.once('SIGINT', () => void shutdown());
  process.once('SIGTERM', () => void shutdown());
} catch (error) {
  if (error instanceof ConfigError) {
    logger.fatal(error.message);
    process.exit(2);
  }
  throw error;
}
