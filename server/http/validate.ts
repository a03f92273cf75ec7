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

/**
 * Query strings already accepted, by schema: a list refetched again and again (the same page, the
 * same filters) is validated once. A query schema is a pure function of its parameters (no default
 * drawn from the clock), so its answer for the same parameters never changes; only accepted queries
 * are kept, the most recently used QUERIES_KEPT per schema, frozen.
 */
const acceptedQueries = new WeakMap<object, Map<string, object>>();
const QUERIES_KEPT = 1000;

/** Validates a query string against its schema; unknown parameters are dropped, failures become 400. */
export async function parseQuery<S extends ObjectSchema<AnyObject>>(schema: S, query: unknown): Promise<Readonly<InferType<S>>> {
  const nul = pathOfNul(query);
  if (nul !== undefined) throw new InputError(`"${nul}" contains a NUL character: remove it.`, { [nul]: NUL_REASON });
  let accepted = acceptedQueries.get(schema);
  if (!accepted) acceptedQueries.set(schema, (accepted = new Map()));
  const key = JSON.stringify(query ?? {});
  const kept = accepted.get(key);
  if (kept) {
    accepted.delete(key);
    accepted.set(key, kept);
    return kept as InferType<S>;
  }
  const parsed = Object.freeze(await schema.validate(query ?? {}, { abortEarly: false, stripUnknown: true }));
  accepted.set(key, parsed);
  if (accepted.size > QUERIES_KEPT) accepted.delete(accepted.keys().next().value as string);
  return parsed;
}
