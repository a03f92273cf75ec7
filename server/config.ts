/** Configuration, read and checked once at start; a missing or bad value is listed by name. */
export type Config = {
  port: number;
  appOrigin: string;
  databaseUrl: string;
  sessionSecret: string;
  oidcIssuer: string;
  oidcClientId: string;
  smtpHost: string;
  smtpPort: number;
  mailFrom: string;
  /** Development only: the mail catcher's listing, shown on the Outbox page. */
  mailCatcherUrl?: string;
  /** How long a password entered for one signature stays usable for it. */
  signatureFreshnessSeconds: number;
  mailPollMs: number;
  mailRetryBaseMs: number;
  production: boolean;
  serveClientFrom?: string;
  logLevel: string;
  rateLimitPerMinute: number;
  signInRateLimitPerMinute: number;
  jobsEnabled: boolean;
};

export class ConfigError extends Error {}

const LOOPBACK = new Set(['localhost', '127.0.0.1', '[::1]', '::1']);

function urlOrProblem(name: string, value: string, problems: string[]): URL | undefined {
  try {
    return new URL(value);
  } catch {
    problems.push(`${name} is not a URL ("${value}")`);
    return undefined;
  }
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const problems: string[] = [];
  const required = (name: string) => {
    const value = env[name];
    if (!value) problems.push(`${name} is required`);
    return value ?? '';
  };
  const integer = (name: string, fallback: number) => {
    const raw = env[name];
    if (raw === undefined || raw === '') return fallback;
    const value = Number(raw);
    if (!Number.isInteger(value) || value < 0) problems.push(`${name} must be a non-negative integer (got "${raw}")`);
    return value;
  };
  const production = env.NODE_ENV === 'production';
  const config: Config = {
    port: integer('PORT', 3000),
    appOrigin: (env.APP_ORIGIN ?? 'http://localhost:3000').replace(/\/$/, ''),
    databaseUrl: required('DATABASE_URL'),
    sessionSecret: required('SESSION_SECRET'),
    oidcIssuer: (env.OIDC_ISSUER ?? 'http://localhost:3001').replace(/\/$/, ''),
    oidcClientId: env.OIDC_CLIENT_ID ?? 'orrery',
    smtpHost: env.SMTP_HOST ?? '127.0.0.1',
    smtpPort: integer('SMTP_PORT', 2525),
    mailFrom: env.MAIL_FROM ?? 'Orrery <no-reply@orrery.test>',
    mailCatcherUrl: production ? undefined : env.MAIL_CATCHER_URL,
    signatureFreshnessSeconds: integer('SIGNATURE_FRESHNESS_SECONDS', 300),
    mailPollMs: integer('MAIL_POLL_MS', 2000),
    mailRetryBaseMs: integer('MAIL_RETRY_BASE_MS', 5000),
    production,
    serveClientFrom: env.SERVE_CLIENT_FROM,
    logLevel: env.LOG_LEVEL ?? (production ? 'info' : 'info'),
    rateLimitPerMinute: integer('RATE_LIMIT_PER_MINUTE', 1200),
    signInRateLimitPerMinute: integer('SIGN_IN_RATE_LIMIT_PER_MINUTE', 30),
    jobsEnabled: env.JOBS_ENABLED !== 'false',
  };
  const appOrigin = urlOrProblem('APP_ORIGIN', config.appOrigin, problems);
  const issuer = urlOrProblem('OIDC_ISSUER', config.oidcIssuer, problems);
  if (production) {
    if (config.sessionSecret && config.sessionSecret.length < 32) problems.push('SESSION_SECRET must be at least 32 characters in production');
    if (!env.APP_ORIGIN || (appOrigin && appOrigin.protocol !== 'https:')) problems.push('APP_ORIGIN must be the https address people use in production');
    if (!env.OIDC_ISSUER || (issuer && issuer.protocol !== 'https:')) problems.push('OIDC_ISSUER must be your organisation’s OpenID provider over https in production');
    if (issuer && LOOPBACK.has(issuer.hostname)) {
      problems.push('OIDC_ISSUER points at this machine: the local identity provider stands in for development only');
    }
  }
  if (problems.length > 0) throw new ConfigError(`Configuration problems:\n - ${problems.join('\n - ')}`);
  return config;
}
