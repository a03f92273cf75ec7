/**
 * fast-check generators of hostile query strings for the read-route fuzzing: parameters the routes
 * read (taken from their shared schemas) and others, given twice, as lists or objects, or once
 * with hostile text, numbers, malformed percent-encoding and long values (up to 1,000 characters:
 * Node itself answers 431 to a request line beyond 16 KB).
 */
import fc from 'fast-check';
import { listQuerySchema } from '../../server/patients/patients.schema.js';
import { auditQuerySchema } from '../../server/audit/audit.schema.js';
import { portfolioFilterSchema } from '../../server/portfolio/portfolio.schema.js';
import { HOSTILE_NUMBERS, HOSTILE_STRINGS } from './fuzz-payloads.js';

/** Keys some route reads, and a few no route reads. */
export const QUERY_KEYS: readonly string[] = [
  ...new Set([
    ...Object.keys(listQuerySchema.fields),
    ...Object.keys(auditQuerySchema.fields),
    ...Object.keys(portfolioFilterSchema.fields),
    'a',
    'b',
    'thetaT',
    'dataset',
    'dryRun',
    'returnTo',
    'id',
    'trialId',
    'role',
  ]),
];

/** A query string exactly as it goes on the wire (after the `?`), and what the server must do with it. */
export type RawQuery = { kind: string; query: string; refusedKey?: string };

const key = fc.oneof({ weight: 4, arbitrary: fc.constantFrom(...QUERY_KEYS) }, { weight: 1, arbitrary: fc.stringMatching(/^[a-zA-Z][a-zA-Z0-9_]{0,11}$/) });

const text = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(...HOSTILE_STRINGS).map((s) => s.slice(0, 1_000)) },
  { weight: 2, arbitrary: fc.constantFrom(...HOSTILE_NUMBERS).map(String) },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 30 }) },
  { weight: 1, arbitrary: fc.string({ maxLength: 20 }) },
);

/** Every UTF-8 byte percent-encoded (lone surrogates become U+FFFD, as a browser would send them). */
const percent = (value: string) => [...Buffer.from(value, 'utf8')].map((byte) => `%${byte.toString(16).padStart(2, '0').toUpperCase()}`).join('');
const encode = (k: string, v: string) => `${percent(k)}=${percent(v)}`;

/** Single, plain parameters with hostile values: never a 5xx, a refusal in the error shape. */
const singles = fc
  .uniqueArray(fc.tuple(key, text), { minLength: 1, maxLength: 4, selector: ([k]) => k })
  .map((pairs) => ({ kind: 'hostile values', query: pairs.map(([k, v]) => encode(k, v)).join('&') }));

/** Malformed percent-encoding, written raw. */
const malformed = fc
  .tuple(key, fc.constantFrom('%', '%zz', '%E0%A4%A', '%00', '%C0%AF', '%ud800', '+%2B+'))
  .map(([k, raw]) => ({ kind: 'malformed encoding', query: `${percent(k)}=${raw}` }));

/** The same key twice or more: 400 naming it. */
const repeated = fc
  .tuple(key, fc.array(text, { minLength: 2, maxLength: 4 }))
  .map(([k, values]) => ({ kind: 'repeated key', query: values.map((v) => encode(k, v)).join('&'), refusedKey: k }));

/** List or object syntax: 400 naming the key before the bracket. */
const structured = fc
  .tuple(key, fc.constantFrom('[]', '[0]', '[x]', '[x][y]', '[__proto__]', '[constructor][prototype]'), text)
  .map(([k, suffix, v]) => ({ kind: 'list or object', query: `${percent(k)}${suffix}=${percent(v)}`, refusedKey: k }));

export const hostileQuery: fc.Arbitrary<RawQuery> = fc.oneof(
  { weight: 3, arbitrary: singles },
  { weight: 1, arbitrary: malformed },
  { weight: 2, arbitrary: repeated },
  { weight: 2, arbitrary: structured },
);
