/**
 * The server as an OpenID Connect client (authorization code + PKCE). Discovery is lazy and
 * retried, so the app starts even when the identity provider is still coming up.
 */
import * as oidc from 'openid-client';
import type { Config } from '../config.js';

/** What Orrery takes from the provider: who, their verified e-mail, their name, and when the password was entered. */
export type IdentityClaims = {
  subject: string;
  email: string;
  name: string | null;
  /** `auth_time` of the ID token (seconds since the epoch); absent when the provider did not say. */
  authTime: number | undefined;
  idToken: string;
};

/** A sign-in the provider answered but Orrery refuses; `code` goes back to the sign-in page. */
export class SignInRefused extends Error {
  constructor(
    readonly code: 'unverified-email' | 'no-email',
    message: string,
  ) {
    super(message);
  }
}

export type OidcClient = {
  redirectUri: string;
  authorizationUrl: (input: { state: string; nonce: string; codeVerifier: string; forceLogin: boolean; loginHint?: string }) => Promise<URL>;
  exchange: (currentUrl: URL, checks: { state: string; nonce: string; codeVerifier: string }) => Promise<IdentityClaims>;
  endSessionUrl: (idToken: string | undefined) => Promise<string>;
};

export function createOidcClient(config: Config): OidcClient {
  const redirectUri = `${config.appOrigin}/auth/callback`;
  let discovered: Promise<oidc.Configuration> | undefined;

  const configuration = () => {
    discovered ??= oidc
      .discovery(new URL(config.oidcIssuer), config.oidcClientId, undefined, oidc.None(), {
        execute: config.oidcIssuer.startsWith('http://') ? [oidc.allowInsecureRequests] : [],
        timeout: 5,
      })
      .catch((error: unknown) => {
        discovered = undefined;
        throw error;
      });
    return discovered;
  };

  return {
    redirectUri,
    async authorizationUrl({ state, nonce, codeVerifier, forceLogin, loginHint }) {
      const parameters: Record<string, string> = {
        redirect_uri: redirectUri,
        scope: 'openid email profile',
        code_challenge: await oidc.calculatePKCECodeChallenge(codeVerifier),
        code_challenge_method: 'S256',
        state,
        nonce,
      };
      if (forceLogin) {
        parameters.prompt = 'login';
        parameters.max_age = '0';
      }
      if (loginHint) parameters.login_hint = loginHint;
      return oidc.buildAuthorizationUrl(await configuration(), parameters);
    },
    async exchange(currentUrl, checks) {
      const conf = await configuration();
      const tokens = await oidc.authorizationCodeGrant(conf, currentUrl, {
        pkceCodeVerifier: checks.codeVerifier,
        expectedState: checks.state,
        expectedNonce: checks.nonce,
        idTokenExpected: true,
      });
      const claims = tokens.claims();
      if (!claims) throw new Error('the identity provider returned no ID token');
      const info = await oidc.fetchUserInfo(conf, tokens.access_token, claims.sub);
      const email = [info.email, claims.email].find((value): value is string => typeof value === 'string')?.toLowerCase() ?? '';
      if (!email) throw new SignInRefused('no-email', 'the identity provider returned no e-mail address');
      // Roles attach to e-mail addresses: one the provider has not verified could claim someone else's invitation.
      if ((info.email_verified ?? claims.email_verified) !== true) throw new SignInRefused('unverified-email', 'the identity provider has not verified the e-mail address');
      return {
        subject: claims.sub,
        email,
        name: info.name ?? (claims.name as string | undefined) ?? null,
        authTime: typeof claims.auth_time === 'number' ? claims.auth_time : undefined,
        idToken: tokens.id_token ?? '',
      };
    },
    async endSessionUrl(idToken) {
      const parameters: Record<string, string> = { post_logout_redirect_uri: `${config.appOrigin}/` };
      if (idToken) parameters.id_token_hint = idToken;
      return oidc.buildEndSessionUrl(await configuration(), parameters).href;
    },
  };
}
