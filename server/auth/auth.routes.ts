/**
 * Sign-in, the identity provider's callback, sign-out. `?intent=<action>&subject=<id>` asks for a
 * password entry for one signature (`prompt=login`, `max_age=0`): the callback checks that the
 * provider says when the password was entered (`auth_time`), that it was entered after the request
 * and by the person signed in, and stores it as a signing authentication for that intent only.
 */
import { promisify } from 'node:util';
import * as oidc from 'openid-client';
import type { Request, Response } from 'express';
import type { RouteSpec } from '../http/routes.js';
import { SESSION_COOKIE } from '../http/session.js';
import { InputError } from '../http/errors.js';
import { isUuid } from './access.js';
import { recordSigningAuthentication, SIGNING_ACTIONS, type SigningAction, type SigningIntent } from '../signatures/signatures.js';
import { SignInRefused, type OidcClient } from './oidc.js';
import { provisionUser } from './users.repository.js';

function safeReturnTo(value: unknown): string {
  // URL parsers drop tabs and newlines, so "/\t/evil.test" would become "//evil.test": refuse control characters too.
  // eslint-disable-next-line no-control-regex -- control characters are exactly what this refuses
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') && !value.includes('\\') && !/[\u0000-\u001f\u007f]/.test(value)
    ? value
    : '/';
}

/** The signing intent named in the query string, if any; a malformed one is refused rather than ignored. */
function signingIntentOf(query: Request['query']): SigningIntent | undefined {
  const { intent, subject } = query;
  if (intent === undefined && subject === undefined) return undefined;
  if (!SIGNING_ACTIONS.includes(intent as SigningAction)) {
    throw new InputError('Unknown signing intent.', { intent: `Use one of: ${SIGNING_ACTIONS.join(', ')}.` });
  }
  if (!isUuid(subject)) throw new InputError('The record to sign is not named.', { subject: 'Give the id of the record to sign.' });
  return { action: intent as SigningAction, subjectId: subject };
}

/** The identity provider's clock may run a little ahead of or behind ours. */
const CLOCK_SKEW_SECONDS = 30;

const regenerate = (req: Request): Promise<void> => promisify(req.session.regenerate.bind(req.session))();
const save = (req: Request): Promise<void> => promisify(req.session.save.bind(req.session))();
const destroy = (req: Request): Promise<void> => promisify(req.session.destroy.bind(req.session))();

function back(res: Response, returnTo: string, signInError: string) {
  res.redirect(`${returnTo}${returnTo.includes('?') ? '&' : '?'}signInError=${signInError}`);
}

export function authRoutes(client: OidcClient): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/auth/login',
      access: { kind: 'public' },
      handler: async (req, res) => {
        const intent = signingIntentOf(req.query);
        const login = {
          state: oidc.randomState(),
          nonce: oidc.randomNonce(),
          codeVerifier: oidc.randomPKCECodeVerifier(),
          returnTo: safeReturnTo(req.query.returnTo),
          signing: intent && { intent, requestedAt: Date.now() },
        };
        req.session.login = login;
        await save(req);
        // A signature confirms the person already signed in: offer their e-mail, ask only for the password.
        const loginHint = intent ? req.session.email : undefined;
        const url = await client.authorizationUrl({ ...login, forceLogin: Boolean(intent), loginHint });
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
          await save(req);
          back(res, login.signing ? login.returnTo : '/', error instanceof SignInRefused ? error.code : 'failed');
          return;
        }
        const { signing } = login;
        if (signing) {
          // The signature rests on this password entry: the provider must say when it happened, and it must be now.
          const refusal =
            claims.authTime === undefined
              ? 'no-auth-time'
              : claims.authTime * 1000 < signing.requestedAt - CLOCK_SKEW_SECONDS * 1000
                ? 'not-fresh'
                : undefined;
          if (refusal) {
            req.log?.warn({ refusal }, 'signing authentication refused');
            req.session.login = undefined;
            await save(req);
            back(res, login.returnTo, refusal);
            return;
          }
        }
        const user = await provisionUser(db, claims);
        if (signing && req.session.userId && req.session.userId !== user.id) {
          // A signature must come from the person already signed in, never a switched account.
          req.session.login = undefined;
          await save(req);
          back(res, login.returnTo, 'different-user');
          return;
        }
        // A new sign-in gets a new session id (no fixation); a password entered again by the person signed in keeps it, so their other entries still count.
        if (req.session.userId !== user.id) await regenerate(req);
        req.session.login = undefined;
        req.session.userId = user.id;
        req.session.email = user.email;
        req.session.name = user.name;
        req.session.idToken = claims.idToken;
        if (signing && claims.authTime !== undefined) {
          await recordSigningAuthentication(db, {
            userId: user.id,
            sessionId: req.sessionID,
            intent: signing.intent,
            signerName: user.name ?? user.email,
            authenticatedAt: new Date(claims.authTime * 1000),
            validForSeconds: config.signatureFreshnessSeconds,
          });
        }
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
