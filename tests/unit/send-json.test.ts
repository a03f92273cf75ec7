/** JSON answers serialised once per frozen object (server/http/send-json.ts), afresh for anything else. */
import { describe, expect, it } from 'vitest';
import express from 'express';
import request from 'supertest';
import { sendJson } from '../../server/http/send-json.js';
import { deepFreeze } from '../../server/db/trial-versions.js';

function appSending(value: () => object, envelope?: string) {
  const app = express();
  app.set('etag', 'weak');
  app.get('/', (_req, res) => sendJson(res, value(), envelope));
  return app;
}

describe('sendJson', () => {
  it('when a frozen answer is sent twice, then both carry the same text and tag as res.json would, and the tag earns a 304', async () => {
    const answer = deepFreeze({ cohorts: [{ code: 'A', responders: 3 }] });
    const app = appSending(() => answer, 'evaluation');
    const first = await request(app).get('/');
    const second = await request(app).get('/');
    expect(first.headers['content-type']).toBe('application/json; charset=utf-8');
    expect(first.body).toEqual({ evaluation: answer });
    expect(second.text).toBe(first.text);
    expect(second.headers.etag).toBe(first.headers.etag);
    const plain = express().set('etag', 'weak');
    plain.get('/', (_req, res) => res.json({ evaluation: answer }));
    expect((await request(plain).get('/')).headers.etag).toBe(first.headers.etag);
    expect((await request(app).get('/').set('If-None-Match', first.headers.etag)).status).toBe(304);
  });

  it('when the answer is not frozen, then a change to it is sent the next time', async () => {
    const answer = { responders: 1 };
    const app = appSending(() => answer);
    expect((await request(app).get('/')).body).toEqual({ responders: 1 });
    answer.responders = 2;
    expect((await request(app).get('/')).body).toEqual({ responders: 2 });
  });
});
