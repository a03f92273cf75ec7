/**
 * A local OpenID Connect provider standing in for the organisation's hosted identity service:
 * authorization code with PKCE, its own sign-in page, no consent screen for the first-party
 * client, `prompt=login` and `max_age=0` honoured (a fresh password entry, needed for electronic
 * signatures), `auth_time` in every ID token and `email_verified` among the claims. For
 * development and tests only: it refuses to start in production mode.
 */
import { generateKeyPairSync } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import express from 'express';
import Provider, { type Configuration, type KoaContextWithOIDC } from 'oidc-provider';
import { accounts, findAccountByEmail, findAccountBySub } from './accounts.js';
import { signInPage, signOutPage, page } from './pages.js';

/** Ways a test makes this provider depart from what Orrery requires, to show the refusal. */
export type IdpQuirks = {
  /** ID tokens without `auth_time` (a provider that does not say when the password was entered). */
  omitAuthTime?: boolean;
  /** ID tokens whose `auth_time` is this many seconds earlier (a provider that reuses an old login despite `prompt=login`). */
  authTimeEarlierBySeconds?: number;
};

export type IdpOptions = {
  port: number;
  issuer?: string;
  /** Origins of the Orrery servers allowed to use this provider (their /auth/callback). */
  appOrigins: string[];
  clientId?: string;
  quirks?: IdpQuirks;
};

export type RunningIdp = { issuer: string; close: () => Promise<void> };

export function createProvider(options: Required<Omit<IdpOptions, 'port' | 'quirks'>> & { quirks?: IdpQuirks }): Provider {
  const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 });
  const configuration: Configuration = {
    clients: [
      {
        client_id: options.clientId,
        token_endpoint_auth_method: 'none',
        grant_types: ['authorization_code'],
        response_types: ['code'],
        redirect_uris: options.appOrigins.map((origin) => `${origin}/auth/callback`),
        post_logout_redirect_uris: options.appOrigins.map((origin) => `${origin}/`),
        require_auth_time: true,
      },
    ],
    jwks: { keys: [{ ...privateKey.export({ format: 'jwk' }), use: 'sig', alg: 'RS256', kid: 'local-1' }] },
    cookies: { keys: [`local-idp-${Math.random().toString(36).slice(2)}`] },
    claims: { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name'] },
    conformIdTokenClaims: false,
    pkce: { required: () => true },
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: (ctx: KoaContextWithOIDC, form: string) => {
          ctx.body = signOutPage(form);
        },
        postLogoutSuccessSource: (ctx: KoaContextWithOIDC) => {
          ctx.body = page('Signed out', '<h1>You are signed out.</h1>');
        },
      },
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    findAccount(_ctx, sub) {
      const account = findAccountBySub(sub);
      if (!account) return undefined;
      return {
        accountId: account.sub,
        claims: () => ({ sub: account.sub, email: account.email, email_verified: account.emailVerified, name: account.name }),
      };
    },
    async loadExistingGrant(ctx) {
      const clientId = ctx.oidc.client!.clientId;
      const grantId = ctx.oidc.result?.consent?.grantId ?? ctx.oidc.session!.grantIdFor(clientId);
      if (grantId) {
        const existing = await ctx.oidc.provider.Grant.find(grantId);
        if (existing) return existing;
      }
      // First-party client: grant the basic scopes without a consent screen.
      const grant = new ctx.oidc.provider.Grant({ clientId, accountId: ctx.oidc.session!.accountId! });
      grant.addOIDCScope('openid email profile');
      await grant.save();
      return grant;
    },
    ttl: { Session: 8 * 60 * 60, Interaction: 30 * 60, Grant: 8 * 60 * 60, AccessToken: 10 * 60, IdToken: 10 * 60, AuthorizationCode: 60 },
    renderError: (ctx, out) => {
      ctx.type = 'html';
      ctx.body = page('Sign-in problem', `<h1>Sign-in problem</h1><p class="note">${String(out.error_description ?? out.error).replace(/[<>&]/g, '')}</p>`);
    },
  };
  const provider = new Provider(options.issuer, configuration);
  provider.proxy = false;
  const quirks = options.quirks ?? {};
  if (quirks.omitAuthTime || quirks.authTimeEarlierBySeconds) {
    // eslint-disable-next-line @typescript-eslint/unbound-method -- wrapped below and always called with the token as `this`
    const payload = provider.IdToken.prototype.payload;
    provider.IdToken.prototype.payload = async function withQuirks(this: InstanceType<typeof provider.IdToken>) {
      const { auth_time: authTime, ...rest } = (await payload.call(this)) as Record<string, unknown>;
      if (quirks.omitAuthTime || typeof authTime !== 'number') return rest;
      return { ...rest, auth_time: authTime - (quirks.authTimeEarlierBySeconds ?? 0) };
    };
  }
  return provider;
}

export async function startIdp(options: IdpOptions): Promise<RunningIdp> {
  if (process.env.NODE_ENV === 'production') {
    throw new Error('The local identity provider stands in for development and tests only; production signs in at the organisation’s own OpenID provider.');
  }
  const issuer = options.issuer ?? `http://localhost:${options.port}`;
  const provider = createProvider({ issuer, appOrigins: options.appOrigins, clientId: options.clientId ?? 'orrery', quirks: options.quirks });
  const app = express();
  app.disable('x-powered-by');

  app.get('/interaction/:uid', async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      if (details.prompt.name !== 'login') {
        // Consent is granted by loadExistingGrant; finish any other prompt straight away.
        await provider.interactionFinished(req, res, { consent: {} }, { mergeWithLastSubmission: true });
        return;
      }
      const fresh = details.params.prompt === 'login' || details.params.max_age === '0';
      res.type('html').send(signInPage({ uid: details.uid, fresh, email: details.params.login_hint as string | undefined }));
    } catch (error) {
      next(error);
    }
  });

  app.post('/interaction/:uid/login', express.urlencoded({ extended: false, limit: '10kb' }), async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      const email = String(req.body?.email ?? '');
      const account = findAccountByEmail(email);
      if (!account || account.password !== String(req.body?.password ?? '')) {
        res
          .status(401)
          .type('html')
          .send(signInPage({ uid: details.uid, email, error: 'That e-mail and password do not match an account.', fresh: false }));
        return;
      }
      await provider.interactionFinished(req, res, { login: { accountId: account.sub } }, { mergeWithLastSubmission: false });
    } catch (error) {
      next(error);
    }
  });

  app.get('/accounts', (_req, res) => {
    res.json({ accounts: accounts.map(({ email, name }) => ({ email, name })) });
  });

  app.use(provider.callback());

  const server = app.listen(options.port, '127.0.0.1');
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  return {
    issuer: issuer.replace(/:0$/, `:${(server.address() as AddressInfo).port}`),
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}
