/**
 * One rule for the query string of every route: each parameter at most once, as plain text. A
 * repeated key (`?q=a&q=b`) or list and object syntax (`?q[]=a`, `?q[x]=a`) is refused with 400
 * naming the parameter, before any route reads it, so no handler ever sees an array where it
 * expects text. A value carrying a NUL character (`%00`) is refused the same way: PostgreSQL text
 * cannot hold it, so it could only fail later, deeper down.
 */
import type { RequestHandler } from 'express';
import { InputError } from './errors.js';

export const NUL_REASON = 'Contains a NUL character (%00), which no text field accepts: remove it.';

/** The dotted path of the first string inside `value` that carries a NUL character, if any. */
export function pathOfNul(value: unknown, path = '', depth = 0): string | undefined {
  if (typeof value === 'string') return value.includes('\u0000') ? path || '_' : undefined;
  if (!value || typeof value !== 'object' || depth > 32) return undefined;
  for (const [key, inner] of Object.entries(value)) {
    const found = pathOfNul(inner, path ? `${path}.${key}` : key, depth + 1);
    if (found !== undefined) return found;
  }
  return undefined;
}

export const singleValuedQuery: RequestHandler = (req, _res, next) => {
  const fields: Record<string, string> = {};
  for (const [key, value] of Object.entries(req.query as Record<string, unknown>)) {
    const name = key.split('[')[0] || key;
    if (key !== name || key.includes(']')) fields[name] = `Give "${name}" once, as plain text: lists and objects are not accepted.`;
    else if (Array.isArray(value)) fields[name] = `"${name}" appears ${value.length} times: give it once.`;
    else if (typeof value !== 'string') fields[name] = `Give "${name}" once, as plain text.`;
    else if (value.includes('\u0000')) fields[name] = NUL_REASON;
  }
  const names = Object.keys(fields);
  if (names.length === 0) return next();
  const listed = names.map((n) => `"${n}"`).join(', ');
  const message = names.every((n) => fields[n] === NUL_REASON)
    ? `The query string gives ${listed} with a NUL character: remove it.`
    : `The query string gives ${listed} more than once, as a list or with a NUL character: give each parameter once, as plain text.`;
  next(new InputError(message, fields));
};
