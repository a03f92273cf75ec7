/**
 * The real sign-in, without a browser: follows the authorization-code flow with PKCE through the
 * local identity provider's sign-in form, keeping cookies like a browser would, and returns the
 * Orrery session cookie plus a small HTTP client that sends it (and the Origin header on writes).
 */
import request from 'supertest';
import { signingUrl, type SigningAction } from '../../server/signatures/signatures.js';

type Jar = Map<string, string>;

function storeCookies(jar: Jar, response: Response) {
  for (const line of response.headers.getSetCookie()) {
    const [pair, ...attributes] = line.split(';');
    const index = pair.indexOf('=');
    const name = pair.slice(0, index).trim();
    const value = pair.slice(index + 1).trim();
    const expired = attributes.some((a) => /max-age=0/i.test(a.trim()) || /expires=Thu, 01 Jan 1970/i.test(a.trim()));
    if (expired || value === '') jar.delete(name);
    else jar.set(name, value);
  }
}

const cookieHeader = (jar: Jar) => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');

async function go(jar: Jar, url: string, init: RequestInit = {}): Promise<Response> {
  const response = await fetch(url, { ...init, redirect: 'manual', headers: { ...(init.headers ?? {}), cookie: cookieHeader(jar) } });
  storeCookies(jar, response);
  return response;
}

async function follow(jar: Jar, start: Response, base: string): Promise<{ response: Response; url: string }> {
  let response = start;
  let url = base;
  for (let hops = 0; response.status >= 300 && response.status < 400; hops += 1) {
    if (hops > 15) throw new Error('too many redirects');
    url = new URL(response.headers.get('location') as string, url).href;
    response = await go(jar, url);
  }
  return { response, url };
}

export type Session = {
  email: string;
  cookie: string;
  jar: Jar;
  get: (path: string) => request.Test;
  post: (path: string, body?: unknown) => request.Test;
  patch: (path: string, body?: unknown) => request.Test;
  put: (path: string, body?: unknown) => request.Test;
  delete: (path: string) => request.Test;
  /**
   * Enters the password again at the identity provider for one signature (`prompt=login`), as the
   * sign dialogs do: `action` and `subjectId` name what is about to be signed.
   */
  confirmToSign: (action: SigningAction, subjectId: string, password?: string) => Promise<string>;
};

/** Walks the flow and answers the app URL it ends on (a refusal carries `signInError`). */
async function completeSignIn(appUrl: string, jar: Jar, email: string, password: string, loginPath: string): Promise<string> {
  const { response, url } = await follow(jar, await go(jar, `${appUrl}${loginPath}`), `${appUrl}${loginPath}`);
  if (response.status !== 200 || !url.includes('/interaction/')) throw new Error(`expected the sign-in page, got ${response.status} at ${url}`);
  const html = await response.text();
  const action = /action="([^"]+)"/.exec(html)?.[1];
  if (!action) throw new Error('no sign-in form on the identity provider page');
  const formUrl = new URL(action, url).href;
  const posted = await go(jar, formUrl, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ email, password }).toString(),
  });
  if (posted.status === 401) throw new Error(`sign-in refused for ${email}`);
  const done = await follow(jar, posted, formUrl);
  if (!done.url.startsWith(appUrl)) throw new Error(`sign-in did not return to the app (ended at ${done.url})`);
  return done.url;
}

export async function signIn(appUrl: string, email: string, password = 'demo'): Promise<Session> {
  const jar: Jar = new Map();
  await completeSignIn(appUrl, jar, email, password, '/auth/login');
  if (!jar.get('orrery.sid')) throw new Error('no Orrery session cookie after sign-in');
  const origin = new URL(appUrl).origin;
  const withCookie = (test: request.Test) => test.set('Cookie', `orrery.sid=${jar.get('orrery.sid')}`);
  const session: Session = {
    email,
    get cookie() {
      return `orrery.sid=${jar.get('orrery.sid')}`;
    },
    jar,
    get: (path) => withCookie(request(appUrl).get(path)),
    post: (path, body) => withCookie(request(appUrl).post(path)).set('Origin', origin).send(body as object),
    patch: (path, body) => withCookie(request(appUrl).patch(path)).set('Origin', origin).send(body as object),
    put: (path, body) => withCookie(request(appUrl).put(path)).set('Origin', origin).send(body as object),
    delete: (path) => withCookie(request(appUrl).delete(path)).set('Origin', origin),
    confirmToSign: (action, subjectId, pw = password) => completeSignIn(appUrl, jar, email, pw, signingUrl({ action, subjectId })),
  };
  return session;
}
