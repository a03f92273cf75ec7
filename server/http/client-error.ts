/**
 * Requests Node's HTTP parser refuses before Express sees them — an address or headers over the
 * parser's size limit, a request line that is not HTTP, oversized chunk extensions, a request that
 * never finished arriving —
 * answer in the same shape as every other error (`{ error: { code, message, fields? } }`), naming
 * what to change, instead of Node's bare status line. Nothing of such a request reaches a route.
 */
import { maxHeaderSize } from 'node:http';
import type { Duplex } from 'node:stream';

type ParserError = Error & { code?: string; rawPacket?: Buffer };

type Answer = { status: number; statusText: string; error: { code: string; message: string; fields?: Record<string, string> } };

const LIMIT_KB = Math.floor(maxHeaderSize / 1024);

/** What went wrong, in our words: for an oversized request, whether the address (its query string) or the headers are to blame. */
export function clientErrorAnswer(error: ParserError): Answer {
  if (error.code === 'HPE_HEADER_OVERFLOW') {
    const packet = error.rawPacket ?? Buffer.alloc(0);
    const lineEnd = packet.indexOf('\r\n');
    // The request line alone taking half the limit (or not even ending within what arrived) is the address's fault.
    const address = lineEnd < 0 || lineEnd >= maxHeaderSize / 2;
    return {
      status: 431,
      statusText: 'Request Header Fields Too Large',
      error: address
        ? {
            code: 'too_large',
            message: `The address of this request is too long: the address and headers together must stay under ${LIMIT_KB} KB. Shorten the query string.`,
            fields: { query: `The query string makes the address longer than ${LIMIT_KB} KB allows.` },
          }
        : {
            code: 'too_large',
            message: `The headers of this request are too large: the address and headers together must stay under ${LIMIT_KB} KB. Clearing this site's cookies usually mends it.`,
            fields: { headers: `The headers take more than ${LIMIT_KB} KB.` },
          },
    };
  }
  if (error.code === 'HPE_CHUNK_EXTENSIONS_OVERFLOW') {
    return { status: 413, statusText: 'Payload Too Large', error: { code: 'too_large', message: 'The request body is sent in chunks with oversized extensions: send it plainly.' } };
  }
  if (error.code === 'ERR_HTTP_REQUEST_TIMEOUT') {
    return { status: 408, statusText: 'Request Timeout', error: { code: 'timeout', message: 'The request did not arrive in full in time: send it again.' } };
  }
  return { status: 400, statusText: 'Bad Request', error: { code: 'bad_request', message: 'The request is not valid HTTP.' } };
}

/**
 * The server's `clientError` listener: answers once, then closes the connection (the parser cannot
 * go on reading it). As Node's own default, it writes nothing when the socket is gone or an earlier
 * answer on the same connection has begun, which an error answer would corrupt.
 */
export function answerClientError(error: ParserError, socket: Duplex & { _httpMessage?: { headersSent?: boolean } | null }): void {
  if (error.code === 'ECONNRESET' || !socket.writable || socket._httpMessage?.headersSent) {
    socket.destroy();
    return;
  }
  const { status, statusText, error: body } = clientErrorAnswer(error);
  const text = JSON.stringify({ error: body });
  socket.end(
    [
      `HTTP/1.1 ${status} ${statusText}`,
      'Content-Type: application/json; charset=utf-8',
      `Content-Length: ${Buffer.byteLength(text)}`,
      'Cache-Control: no-store',
      'X-Content-Type-Options: nosniff',
      'Connection: close',
      '',
      text,
    ].join('\r\n'),
  );
}
