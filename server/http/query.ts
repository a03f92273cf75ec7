/**
 * One rule for the query string of every route: each parameter at most once, as plain text. A
 * repeated key (`?q=a&q=b`) or list and object syntax (`?q[]=a`, `?q[x]=a`) is refused with 400
 * naming the parameter, before any route reads it, so no handler ever sees an array where it
 * expects text.
 */
import type { RequestHandler } from 'express';
import { InputError } from './errors.js';

export const singleValuedQuery: RequestHandler = (req, _res, next) => {
  const fields: Record<string, string> = {};
  for (const [key, value] of Object.entries(req.query as Record<string, unknown>)) {
    const name = key.split('[')[0] || key;
    if (key !== name || key.includes(']')) fields[name] = `Give "${name}" once, as plain text: lists and objects are not accepted.`;
    else if (Array.isArray(value)) fields[name] = `"${name}" appears ${value.length} times: give it once.`;
    else if (typeof value !== 'string') fields[name] = `Give "${name}" once, as plain text.`;
  }
  const names = Object.keys(fields);
  if (names.length === 0) return next();
  next(new InputError(`The query string gives ${names.map((n) => `"${n}"`).join(', ')} more than once or as a list: give each parameter once.`, fields));
};
