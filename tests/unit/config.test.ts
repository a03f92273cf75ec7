/** Configuration read once at start: in production mode the unsafe settings are refused, each named. */
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config.js';

const PRODUCTION = {
  NODE_ENV: 'production',
  DATABASE_URL: 'postgres://orrery_app@db.internal/orrery',
  SESSION_SECRET: 'a-production-secret-of-at-least-32-characters',
  APP_ORIGIN: 'https://orrery.example.org',
  OIDC_ISSUER: 'https://sign-in.example.org',
};

const problemsOf = (env: Record<string, string | undefined>): string => {
  try {
    loadConfig(env);
  } catch (error) {
    if (error instanceof ConfigError) return error.message;
    throw error;
  }
  return '';
};

describe('production configuration', () => {
  it('when every setting is safe, then production starts with it', () => {
    expect(loadConfig(PRODUCTION)).toMatchObject({ production: true, appOrigin: 'https://orrery.example.org', oidcIssuer: 'https://sign-in.example.org' });
  });

  it('when APP_ORIGIN is http or left to its default, then it is refused by name', () => {
    expect(problemsOf({ ...PRODUCTION, APP_ORIGIN: 'http://orrery.example.org' })).toMatch(/APP_ORIGIN must be the https address/);
    expect(problemsOf({ ...PRODUCTION, APP_ORIGIN: undefined })).toMatch(/APP_ORIGIN must be the https address/);
  });

  it('when OIDC_ISSUER is http, left to its default or on this machine (the local identity provider), then it is refused by name', () => {
    expect(problemsOf({ ...PRODUCTION, OIDC_ISSUER: 'http://sign-in.example.org' })).toMatch(/OIDC_ISSUER must be your organisation’s OpenID provider over https/);
    expect(problemsOf({ ...PRODUCTION, OIDC_ISSUER: undefined })).toMatch(/OIDC_ISSUER must be/);
    expect(problemsOf({ ...PRODUCTION, OIDC_ISSUER: 'https://localhost:3001' })).toMatch(/local identity provider stands in for development only/);
    expect(problemsOf({ ...PRODUCTION, OIDC_ISSUER: 'https://127.0.0.1:3001' })).toMatch(/local identity provider/);
  });

  it('when SESSION_SECRET is missing or shorter than 32 characters, then it is refused by name', () => {
    expect(problemsOf({ ...PRODUCTION, SESSION_SECRET: undefined })).toMatch(/SESSION_SECRET is required/);
    expect(problemsOf({ ...PRODUCTION, SESSION_SECRET: 'x'.repeat(31) })).toMatch(/SESSION_SECRET must be at least 32 characters/);
  });

  it('when several settings are wrong, then all are listed at once', () => {
    const message = problemsOf({ NODE_ENV: 'production', DATABASE_URL: 'postgres://x@db/orrery', SESSION_SECRET: 'short' });
    const [heading, ...problems] = message.split('\n - ');
    expect(heading).toBe('Configuration problems:');
    expect(problems.map((p) => p.split(' ')[0])).toEqual(['SESSION_SECRET', 'APP_ORIGIN', 'OIDC_ISSUER', 'OIDC_ISSUER']);
  });

  it('when not in production, then the local defaults (http, the local identity provider) are accepted', () => {
    expect(loadConfig({ DATABASE_URL: 'postgres://x@localhost/orrery', SESSION_SECRET: 'dev' })).toMatchObject({ production: false, oidcIssuer: 'http://localhost:3001' });
  });
});
