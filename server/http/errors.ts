/** Typed errors: each maps to one HTTP status and the one JSON error shape. */
export type FieldErrors = Record<string, string>;

export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly extra: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

export class InputError extends AppError {
  constructor(message: string, fields?: FieldErrors) {
    super(400, 'invalid_input', message, fields ? { fields } : {});
  }
}

export class UnauthenticatedError extends AppError {
  constructor(message = 'Sign in to continue.', extra: Record<string, unknown> = {}) {
    super(401, 'unauthenticated', message, extra);
  }
}

export class ReauthenticationRequiredError extends AppError {
  constructor(reauthUrl: string) {
    super(401, 'reauthentication_required', 'Signing needs a fresh sign-in: confirm your identity and try again.', {
      reauthUrl,
    });
  }
}

export class ForbiddenError extends AppError {
  constructor(message = 'Your role on this trial does not allow this.') {
    super(403, 'forbidden', message);
  }
}

export class NotFoundError extends AppError {
  constructor(what = 'The record') {
    super(404, 'not_found', `${what} was not found.`);
  }
}

export class ConflictError extends AppError {
  constructor(message: string, extra: Record<string, unknown> = {}) {
    super(409, 'conflict', message, extra);
  }
}

export class ServiceUnavailableError extends AppError {
  constructor(message = 'The database is not reachable right now. Try again shortly.') {
    super(503, 'service_unavailable', message);
  }
}
