/** The one way the client talks to the server: JSON in, JSON out, errors as ApiError with the server's fields. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

type Options = { method?: string; body?: unknown; signal?: AbortSignal; formData?: FormData };

export async function api<T>(path: string, options: Options = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  let body: BodyInit | undefined;
  if (options.formData) body = options.formData;
  else if (options.body !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(options.body);
  }
  let response: Response;
  try {
    response = await fetch(path, { method: options.method ?? 'GET', headers, body, credentials: 'same-origin', signal: options.signal });
  } catch (error) {
    if ((error as Error).name === 'AbortError') throw error;
    throw new ApiError(0, 'network', 'The server could not be reached. Check your connection and try again.');
  }
  if (response.status === 204) return undefined as T;
  const isJson = response.headers.get('content-type')?.includes('application/json');
  const payload = isJson ? await response.json() : undefined;
  if (!response.ok) {
    const error = payload?.error ?? {};
    const { code, message, fields, ...details } = error;
    throw new ApiError(response.status, code ?? 'http_error', message ?? `Request failed (${response.status}).`, fields ?? {}, details);
  }
  return payload as T;
}

/**
 * Sends the browser to the identity provider to enter the password for one signature — `signingUrl`
 * is the server's, naming what is about to be signed — and back here to sign.
 */
export function confirmIdentityToSign(signingUrl: string, returnTo = window.location.pathname + window.location.search): void {
  const back = new URL(returnTo, window.location.origin);
  // A refusal from an earlier attempt is not this attempt's.
  back.searchParams.delete('signInError');
  window.location.assign(`${signingUrl}&returnTo=${encodeURIComponent(back.pathname + back.search)}`);
}

/** The server asks for the password for this signature: the URL to enter it, if that is what the error says. */
export function signingUrlOf(error: unknown): string | undefined {
  if (!(error instanceof ApiError) || error.code !== 'reauthentication_required') return undefined;
  return typeof error.details.reauthUrl === 'string' ? error.details.reauthUrl : undefined;
}

export function signInUrl(returnTo = window.location.pathname + window.location.search): string {
  return `/auth/login?returnTo=${encodeURIComponent(returnTo)}`;
}
