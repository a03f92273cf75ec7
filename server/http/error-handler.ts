/** The one error middleware: every failure leaves as `{ error: { code, message, fields? } }`. */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ValidationError } from 'yup';
import { StatsInputError } from '../stats/errors.js';
import { AppError, InputError, ServiceUnavailableError } from './errors.js';

const DB_DOWN_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', '57P01', '57P02', '57P03', '08006', '08001', '08003']);

export function isDatabaseDown(error: unknown): boolean {
  if (!error || typeof error !== 'object') return false;
  const e = error as { code?: string; name?: string; message?: string };
  if (e.code && DB_DOWN_CODES.has(e.code)) return true;
  if (e.name === 'KnexTimeoutError') return true;
  return /Connection terminated|connect ECONNREFUSED|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(
    e.message ?? '',
  );
}

export function toAppError(error: unknown): AppError | undefined {
  if (error instanceof AppError) return error;
  if (error instanceof ValidationError) {
    const fields: Record<string, string> = {};
    for (const inner of error.inner.length > 0 ? error.inner : [error]) {
      const key = inner.path || '_';
      if (!fields[key]) fields[key] = inner.message;
    }
    return new InputError('Some fields need attention.', fields);
  }
  if (error instanceof StatsInputError) return new InputError(error.message, { [error.field]: error.message });
  const e = error as { type?: string; status?: number; code?: string; field?: string };
  if (e?.type === 'entity.too.large' || e?.code === 'LIMIT_FILE_SIZE') {
    return new AppError(413, 'too_large', 'The request is too large.');
  }
  if (e?.type === 'entity.parse.failed') return new InputError('The request body is not valid JSON.');
  if (e?.code && String(e.code).startsWith('LIMIT_')) return new InputError(`Upload refused: ${(error as Error).message}.`, { [e.field ?? 'file']: (error as Error).message });
  if (e?.code === '22P02' || e?.code === '22007' || e?.code === '22008') return new InputError('A value has the wrong format.');
  // A NUL character or a byte sequence PostgreSQL text cannot hold, past the checks at the door (which name the field).
  if (e?.code === '22021' || e?.code === '22P05') return new InputError('A value contains a character that cannot be stored (such as NUL): remove it.');
  if (isDatabaseDown(error)) return new ServiceUnavailableError();
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
    return new AppError(e.status, 'bad_request', (error as Error).message || 'Bad request.');
  }
  return undefined;
}

export const errorHandler: ErrorRequestHandler = (error, req, res, _next) => {
  // A failure after the answer went out (a session touch as the server shuts down): nothing left to tell the client.
  if (res.headersSent) {
    req.log?.warn({ err: (error as Error)?.message }, 'error after the response was sent');
    if (!res.writableEnded) res.destroy();
    return;
  }
  const known = toAppError(error);
  if (!known) {
    req.log?.error({ err: error }, 'unhandled error');
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on our side. The failure is logged.' } });
    return;
  }
  if (known.status >= 500) req.log?.warn({ code: known.code }, known.message);
  res.status(known.status).json({ error: { code: known.code, message: known.message, ...known.extra } });
};

export const apiNotFound: RequestHandler = (_req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: 'No such API route.' } });
};
