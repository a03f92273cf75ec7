/** What the server answers to requests Node's HTTP parser refuses (server/http/client-error.ts); the API suite sends real ones (tests/api/query-strings.test.ts). */
import { maxHeaderSize } from 'node:http';
import { describe, expect, it } from 'vitest';
import { clientErrorAnswer } from '../../server/http/client-error.js';

const overflow = (packet: string) => Object.assign(new Error('Parse Error: Header overflow'), { code: 'HPE_HEADER_OVERFLOW', rawPacket: Buffer.from(packet) });

describe('clientErrorAnswer', () => {
  it('when the request line takes half the limit or more, then the query string is named; when it ends early, the headers are', () => {
    const longLine = `GET /api/x?q=${'a'.repeat(maxHeaderSize / 2)} HTTP/1.1\r\nhost: x\r\n`;
    expect(clientErrorAnswer(overflow(longLine))).toMatchObject({ status: 431, error: { code: 'too_large', fields: { query: expect.any(String) } } });
    expect(clientErrorAnswer(overflow(`GET /api/x?q=${'a'.repeat(4000)}`))).toMatchObject({ status: 431, error: { fields: { query: expect.any(String) } } });
    const bigCookie = `GET /api/x HTTP/1.1\r\ncookie: ${'c'.repeat(maxHeaderSize)}`;
    expect(clientErrorAnswer(overflow(bigCookie))).toMatchObject({ status: 431, error: { code: 'too_large', fields: { headers: expect.any(String) } } });
  });

  it('when a request never arrives in full, then 408; oversized chunk extensions 413; anything else the parser refuses is 400', () => {
    expect(clientErrorAnswer(Object.assign(new Error('Parse Error'), { code: 'HPE_CHUNK_EXTENSIONS_OVERFLOW' }))).toMatchObject({ status: 413, error: { code: 'too_large' } });
    expect(clientErrorAnswer(Object.assign(new Error('timeout'), { code: 'ERR_HTTP_REQUEST_TIMEOUT' }))).toMatchObject({ status: 408, error: { code: 'timeout' } });
    expect(clientErrorAnswer(Object.assign(new Error('Parse Error'), { code: 'HPE_INVALID_METHOD' }))).toEqual({
      status: 400,
      statusText: 'Bad Request',
      error: { code: 'bad_request', message: 'The request is not valid HTTP.' },
    });
  });
});
