/**
 * fast-check generators of hostile request bodies for the write-route fuzzing: wrong types, missing
 * fields, SQL and script fragments, unicode edge cases, huge and non-finite numbers, deep nesting,
 * prototype-pollution keys, malformed JSON, wrong content types, oversized bodies and hostile
 * uploads. Every JSON object generated carries at least one value of a structurally wrong type
 * (an object or array where a field expects a scalar) or lacks the fields the route requires, so
 * a route that accepts one has a validation gap worth reading about.
 */
import fc from 'fast-check';

/** A request body exactly as it goes on the wire. */
export type RawPayload = { kind: string; contentType?: string; body: string | Buffer };

/** An upload for multipart routes: the form field name, the file and its declared type. */
export type UploadPayload = { kind: string; field: string; filename: string; contentType: string; content: Buffer };

export const JSON_LIMIT_BYTES = 200 * 1024;

export const HOSTILE_STRINGS: readonly string[] = [
  "'; drop table patients; --",
  "' or '1'='1",
  '1; select pg_sleep(10)',
  "x'); delete from audit_log where ('1'='1",
  '$$; truncate users; $$',
  '<script>alert(document.cookie)</script>',
  '<img src=x onerror=alert(1)>',
  'javascript:alert(1)',
  '"><svg/onload=alert(1)>',
  '{{constructor.constructor("return process")()}}',
  '${process.exit(1)}',
  '=HYPERLINK("http://evil.test","x")',
  '+cmd|" /C calc"!A0',
  '../../../../etc/passwd',
  '\u0000',
  'before\u0000after',
  '\ud800',
  '\udfff lone low surrogate',
  'high \ud83d alone',
  '\u202eRTL override\u202c',
  '\u200b\u200c\u200d\ufeff',
  'e\u0301\u0301\u0301\u0301',
  '𝕺𝖗𝖗𝖊𝖗𝖞 🧪🧬',
  '\r\n\r\nHTTP/1.1 200 OK',
  '%00%0d%0a',
  ' ',
  '',
  'NaN',
  'Infinity',
  '-Infinity',
  '-0',
  '1e309',
  '0x1F',
  '١٢٣',
  'null',
  'undefined',
  'true',
  '2026-02-30',
  '0000-00-00',
  '99999-12-31',
  '2026-13-01T25:61:61Z',
  '00000000-0000-0000-0000-000000000000',
  'ffffffff-ffff-ffff-ffff-ffffffffffff',
  'A'.repeat(10_000),
  'é'.repeat(60_000),
];

export const HOSTILE_NUMBERS: readonly number[] = [
  1e308,
  -1e308,
  Number.MAX_SAFE_INTEGER + 2,
  -Number.MAX_SAFE_INTEGER - 2,
  2 ** 31,
  -(2 ** 31) - 1,
  2 ** 63,
  5e-324,
  -0,
  0.1 + 0.2,
  -1,
  1.5,
  0,
  1,
];

/** Strings that may appear as path parameters: real-looking, random and hostile ids. */
export const HOSTILE_IDS: readonly string[] = [
  '00000000-0000-0000-0000-000000000000',
  'not-a-uuid',
  "1' or '1'='1",
  '<script>',
  '0',
  '-1',
  '9'.repeat(40),
  'x'.repeat(2_000),
  '%00',
  '..%2F..%2Fetc%2Fpasswd',
  '\u202e',
  'NaN',
];

export const POLLUTION_KEYS = ['__proto__', 'constructor', 'prototype'] as const;

const hostileString = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(...HOSTILE_STRINGS) },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
  { weight: 1, arbitrary: fc.string({ maxLength: 20 }) },
);
const hostileNumber = fc.oneof(fc.constantFrom(...HOSTILE_NUMBERS), fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer());

const scalar = fc.oneof(hostileString, hostileNumber, fc.boolean(), fc.constant(null));

/** A value that is an object or array: wrong for any field that expects a string, number, date or boolean. */
const structural: fc.Arbitrary<unknown> = fc.oneof(
  fc.array(scalar, { maxLength: 5 }),
  fc.dictionary(fc.string({ maxLength: 8 }), scalar, { maxKeys: 4 }),
  fc.constant({ $gt: '' }),
  fc.constant([[[[[[[[['deep']]]]]]]]]),
  fc.constant({ toString: 'x', valueOf: 1 }),
);

const hostileValue = fc.oneof({ weight: 3, arbitrary: scalar }, { weight: 1, arbitrary: structural });

/** Puts pollution keys into an already-encoded JSON object (a literal `__proto__` would not survive JSON.stringify). */
function withPollution(json: string, key: (typeof POLLUTION_KEYS)[number]): string {
  const poison = key === 'constructor' ? '{"prototype":{"polluted":"yes"}}' : '{"polluted":"yes","isAdmin":true}';
  return json === '{}' ? `{"${key}":${poison}}` : `{"${key}":${poison},${json.slice(1)}`;
}

/**
 * JSON objects built over the fields a route names in its own 400 answer (its required fields),
 * each invalid by construction: either one known field is forced to a structural value, or every
 * known field is missing.
 */
function jsonObjects(fields: string[]): fc.Arbitrary<RawPayload> {
  const extraKeys = fc.dictionary(fc.oneof(fc.string({ maxLength: 12 }), fc.constantFrom('id', 'version', 'trialId', 'role', 'status')), hostileValue, {
    maxKeys: 4,
  });
  const missingFields = extraKeys.map((extra) => {
    const body = Object.fromEntries(Object.entries(extra).filter(([k]) => !fields.includes(k)));
    return { kind: 'missing required fields', contentType: 'application/json', body: JSON.stringify(body) };
  });
  if (fields.length === 0) return missingFields;
  const wrongTyped = fc
    .tuple(
      fc.record(Object.fromEntries(fields.map((f) => [f, hostileValue])), { requiredKeys: [] }),
      fc.constantFrom(...fields),
      structural,
      extraKeys,
    )
    .map(([known, forced, value, extra]) => ({
      kind: 'wrong-typed field',
      contentType: 'application/json',
      body: JSON.stringify({ ...extra, ...known, [forced]: value }),
    }));
  const polluted = fc
    .tuple(wrongTyped, fc.constantFrom(...POLLUTION_KEYS))
    .map(([payload, key]) => ({ ...payload, kind: `prototype pollution (${key})`, body: withPollution(payload.body, key) }));
  return fc.oneof({ weight: 4, arbitrary: wrongTyped }, { weight: 2, arbitrary: missingFields }, { weight: 1, arbitrary: polluted });
}

const nonObjectJson = fc
  .oneof(fc.array(hostileValue, { maxLength: 4 }), hostileString, hostileNumber, fc.boolean(), fc.constant(null))
  .map((value) => ({ kind: 'JSON that is not an object', contentType: 'application/json', body: JSON.stringify(value) }));

const MALFORMED_JSON: readonly string[] = [
  '{',
  '{"a":',
  "{'single': 'quotes'}",
  '{"a":1,}',
  '{"a":NaN}',
  '{"a":Infinity}',
  '{"a":1e999999}',
  '{"a":-1e999999}',
  '{"a":1} {"b":2}',
  '/* comment */ {"a":1}',
  '\ufeff{"a":1}',
  '{"a":"\\ud800"}',
  '{"a":"\\u0000"}',
  `${'['.repeat(5_000)}${']'.repeat(5_000)}`,
  `{"a":${'{"a":'.repeat(3_000)}1${'}'.repeat(3_000)}}`,
  '{"a":1,"a":{"b":[1,2,{"c":"dup"}]}}',
  'undefined',
  '',
];

const malformedJson = fc.constantFrom(...MALFORMED_JSON).map((body) => ({ kind: 'malformed JSON', contentType: 'application/json', body }));

const invalidUtf8 = fc.uint8Array({ minLength: 1, maxLength: 64 }).map((bytes) => ({
  kind: 'invalid UTF-8 in JSON',
  contentType: 'application/json',
  body: Buffer.concat([Buffer.from('{"a":"'), Buffer.from([0xc3, 0x28, 0xff, 0xfe]), Buffer.from(bytes), Buffer.from('"}')]),
}));

const wrongContentType = fc
  .tuple(
    fc.constantFrom(
      'text/plain',
      'application/x-www-form-urlencoded',
      'application/xml',
      'multipart/form-data; boundary=zzz',
      'application/json; charset=utf-16',
      'application/json; charset=utf-7',
      'application/octet-stream',
      'text/csv',
      'image/png',
    ),
    fc.constantFrom(
      '{"email":"x@evil.test","role":"admin"}',
      'email=x%40evil.test&role=admin&a[__proto__][polluted]=yes',
      '<?xml version="1.0"?><!DOCTYPE x [<!ENTITY e SYSTEM "file:///etc/passwd">]><x>&e;</x>',
      '--zzz\r\nContent-Disposition: form-data; name="a"\r\n\r\n1\r\n--zzz--',
      'study_id,outcome\nX-001,responder',
    ),
  )
  .map(([contentType, body]) => ({ kind: `wrong content type (${contentType})`, contentType, body }));

const noContentType = fc.constantFrom('{"a":1}', 'plain words').map((body) => ({ kind: 'no content type', body }));

const oversized = fc.constantFrom(JSON_LIMIT_BYTES + 1, JSON_LIMIT_BYTES * 3).map((size) => ({
  kind: 'oversized JSON',
  contentType: 'application/json',
  body: JSON.stringify({ text: 'x'.repeat(size) }),
}));

/** Every kind of hostile body for a JSON route whose required fields are `fields`. */
export function hostileJsonPayload(fields: string[]): fc.Arbitrary<RawPayload> {
  return fc.oneof(
    { weight: 10, arbitrary: jsonObjects(fields) },
    { weight: 2, arbitrary: nonObjectJson },
    { weight: 2, arbitrary: malformedJson },
    { weight: 1, arbitrary: invalidUtf8 },
    { weight: 2, arbitrary: wrongContentType },
    { weight: 1, arbitrary: noContentType },
    { weight: 1, arbitrary: oversized },
  );
}

/**
 * Hostile uploads for multipart routes: binary, oversized, wrong columns, formula cells, wrong
 * field, and — under `header`, the route's own columns — rows of hostile cells.
 */
export function hostileUpload(field: string, header: readonly string[] = []): fc.Arbitrary<UploadPayload> {
  const csv = (kind: string, text: string) => ({ kind, field, filename: 'outcomes.csv', contentType: 'text/csv', content: Buffer.from(text) });
  return fc.oneof(
    fc.uint8Array({ minLength: 1, maxLength: 4_096 }).map((bytes) => ({
      kind: 'binary file',
      field,
      filename: 'outcomes.csv',
      contentType: 'text/csv',
      content: Buffer.from(bytes),
    })),
    fc.constant({ kind: 'image declared as CSV', field, filename: 'scan.png', contentType: 'image/png', content: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]) }),
    fc.constant(csv('empty file', '')),
    fc.constant(csv('header only, wrong columns', 'name,colour,size\n')),
    fc
      .array(fc.tuple(fc.constantFrom(...HOSTILE_STRINGS.slice(0, 24)), hostileString), { minLength: 1, maxLength: 20 })
      .map((rows) => csv('wrong columns with hostile cells', `alpha,beta\n${rows.map(([a, b]) => `"${a.replace(/"/g, '""')}","${String(b).replace(/"/g, '""')}"`).join('\n')}\n`)),
    fc
      .array(fc.array(fc.constantFrom(...HOSTILE_STRINGS.slice(0, 40)), { minLength: header.length, maxLength: header.length }), { minLength: 1, maxLength: 30 })
      .map((rows) => csv('right columns, hostile cells', `${header.join(',')}\n${rows.map((cells) => cells.map((c) => `"${c.replace(/"/g, '""')}"`).join(',')).join('\n')}\n`)),
    fc.constant(csv('unterminated quote', 'study_id,outcome\n"X-001,responder\n')),
    fc.constant(csv('very many rows', `study_id,outcome\n${'ZZ-999,responder\n'.repeat(200_000)}`)),
    fc.constant(csv('oversized', 'x'.repeat(12 * 1024 * 1024))),
    fc.constant({ ...csv('wrong form field', 'study_id,outcome\n'), field: `${field}-other` }),
  );
}
