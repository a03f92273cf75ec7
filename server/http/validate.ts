/** Validates a payload against its shared Yup schema; failures become 400 with every field named. */
import type { AnyObject, InferType, ObjectSchema } from 'yup';
import { InputError } from './errors.js';
import { NUL_REASON, pathOfNul } from './query.js';

const POLLUTION_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

/** JSON can carry keys that reach an object's prototype; no payload of ours uses them. */
function hasPollutionKey(value: unknown, depth = 0): boolean {
  if (!value || typeof value !== 'object' || depth > 32) return false;
  return Object.keys(value).some((key) => POLLUTION_KEYS.has(key)) || Object.values(value).some((inner) => hasPollutionKey(inner, depth + 1));
}

export async function parseBody<S extends ObjectSchema<AnyObject>>(schema: S, body: unknown): Promise<InferType<S>> {
  const input = body && typeof body === 'object' && !Array.isArray(body) ? body : {};
  if (hasPollutionKey(input)) throw new InputError('The request carries a reserved field name (__proto__, constructor or prototype).');
  const nul = pathOfNul(input);
  if (nul !== undefined) throw new InputError(`"${nul}" contains a NUL character: remove it.`, { [nul]: NUL_REASON });
  try {
    return (await schema.validate(input, { abortEarly: false, stripUnknown: true }));
  } catch (error) {
    // Yup's casting calls methods of the value (trim, toString): an object where text belongs throws a TypeError.
    if (error instanceof TypeError) throw new InputError('A value has the wrong type (an object or list where a single value belongs).');
    throw error;
  }
}

/** Validates a query string against its schema; unknown parameters are dropped, failures become 400. */
export async function parseQuery<S extends ObjectSchema<AnyObject>>(schema: S, query: unknown): Promise<InferType<S>> {
  const nul = pathOfNul(query);
  if (nul !== undefined) throw new InputError(`"${nul}" contains a NUL character: remove it.`, { [nul]: NUL_REASON });
  return (await schema.validate(query ?? {}, { abortEarly: false, stripUnknown: true }));
}
