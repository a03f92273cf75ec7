/** Sign-in, the identity provider's callback, sign-out; `?reauth=1` asks for a fresh sign-in before a signature. */
import { promisify } from 'node:util';
import * as oidc from 'openid-client';
import type { Request } from 'express';
import type { RouteSpec } from '../http/routes.js';
import { SESSION_COOKIE } from '../http/session.js';
import type { OidcClient } from './oidc.js';
import { provisionUser } from './users.repository.js';

function safeReturnTo(value: unknown): string {
  // URL parsers drop tabs and newlines, so "/\t/evil.test" would become "//evil.test": refuse control characters too.
  // eslint-disable-next-line no-control-regex -- control characters are exactly what this refuses
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') && !value.includes('\\') && !/[\u0000-\u001f\u007f]/.test(value)
    ? value
    : '/';
}

const regenerate = (req: Request): Promise<void> => promisify(req.session.regenerate.bind(req.session))();
const save = (req: Request): Promise<void> => promisify(req.session.save.bind(req.session))();
const destroy = (req: Request): Promise<void> => promisify(req.session.destroy.bind(req.session))();

export function authRoutes(client: OidcClient): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/auth/login',
      access: { kind: 'public' },
      handler: async (req, res) => {
        const reauth = req.query.reauth === '1';
        const login = {
          state: oidc.randomState(),
          nonce: oidc.randomNonce(),
          codeVerifier: oidc.randomPKCECodeVerifier(),
          returnTo: safeReturnTo(req.query.returnTo),
          reauth,
        };
        req.session.login = login;
        await save(req);
        // A signature confirms the person already signed in: offer their e-mail, ask only for the password.
        const loginHint = reauth ? req.session.email : undefined;
        const url = await client.authorizationUrl({ ...login, forceLogin: reauth, loginHint });
        res.redirect(url.href);
      },
    },
    {
      method: 'get',
      path: '/auth/callback',
      access: { kind: 'public' },
      handler: async (req, res, { db, config }) => {
        const login = req.session.login;
        if (!login) {
          res.redirect('/?signInError=expired');
          return;
        }
        const currentUrl = new URL(req.originalUrl, config.appOrigin);
        let claims;
        try {
          claims = await client.exchange(currentUrl, login);
        } catch (error) {
          req.log?.warn({ err: (error as Error).message }, 'sign-in callback rejected');
          req.session.login = undefined;
          res.redirect('/?signInError=failed');
          return;
        }
        const user = await provisionUser(db, claims);
        if (login.reauth && req.session.userId && req.session.userId !== user.id) {
          // A signature must come from the person already signed in, never a switched account.
          req.session.login = undefined;
          await save(req);
          res.redirect(`${login.returnTo}${login.returnTo.includes('?') ? '&' : '?'}signInError=different-user`);
          return;
        }
        await regenerate(req);
        req.session.userId = user.id;
        req.session.email = user.email;
        req.session.name = user.name;
        req.session.authTime = claims.authTime;
        req.session.idToken = claims.idToken;
        await save(req);
        res.redirect(login.returnTo);
      },
    },
    {
      method: 'post',
      path: '/auth/logout',
      access: { kind: 'public' },
      handler: async (req, res) => {
        const idToken = req.session.idToken;
        await destroy(req);
        res.clearCookie(SESSION_COOKIE, { path: '/' });
        let redirectTo = '/';
        try {
          redirectTo = await client.endSessionUrl(idToken);
        } catch {
          // The provider is unreachable: the Orrery session is gone all the same.
        }
        res.json({ signedOut: true, redirectTo });
      },
    },
  ];
}
