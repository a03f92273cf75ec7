/**
 * JSON answers serialised once. A service that keeps an answer for many requests (per data
 * version, deep-frozen: server/db/trial-versions.ts) hands the same object to each of them; the
 * bytes and entity tag made from it the first time are kept beside it, by identity, for as long as
 * the object lives. A frozen object cannot change, so its text cannot go stale. Anything not
 * frozen is serialised afresh, exactly as `res.json` would.
 */
import type { Response } from 'express';

/** The answer's bytes (encoded once, as Express would encode the text on every send) and its tag. */
type Serialised = { bytes: Buffer; etag: string | undefined };

const serialised = new WeakMap<object, Map<string, Serialised>>();

/** Sends `value` as JSON, wrapped as `{ [envelope]: value }` when an envelope is named. */
export function sendJson(res: Response, value: object, envelope?: string): void {
  const body = () => (envelope === undefined ? value : { [envelope]: value });
  if (!Object.isFrozen(value)) {
    res.json(body());
    return;
  }
  let byEnvelope = serialised.get(value);
  if (!byEnvelope) serialised.set(value, (byEnvelope = new Map()));
  let kept = byEnvelope.get(envelope ?? '');
  if (!kept) {
    const text = JSON.stringify(body());
    // The same weak tag Express would make (the app's 'etag' setting), so conditional GETs answer 304 alike.
    const etagOf = res.app.get('etag fn') as ((body: string, encoding: BufferEncoding) => string) | undefined;
    kept = { bytes: Buffer.from(text, 'utf8'), etag: etagOf?.(text, 'utf8') };
    byEnvelope.set(envelope ?? '', kept);
  }
  if (kept.etag) res.setHeader('ETag', kept.etag);
  res.set('Content-Type', 'application/json; charset=utf-8');
  res.send(kept.bytes);
}
