import { createServer, type RequestListener, type Server, type ServerOptions } from 'node:http';
import type { Duplex } from 'node:stream';

import { errorBody } from './errors';

/**
 * Request heads up to 64 KiB are read (Node's default is 16 KiB), so that a long cursor or a large
 * cookie reaches the app and is answered by its own checks in the contract's shape.
 */
export const MAX_HEADER_BYTES = 64 * 1024;

const serverOptions: ServerOptions = { maxHeaderSize: MAX_HEADER_BYTES };

function reply(socket: Duplex, status: number, reason: string, body: string) {
  socket.end(
    `HTTP/1.1 ${status} ${reason}\r\ncontent-type: application/json; charset=utf-8\r\ncontent-length: ${Buffer.byteLength(body)}\r\n` +
      `x-content-type-options: nosniff\r\ncache-control: no-store\r\nconnection: close\r\n\r\n${body}`,
  );
}

/**
 * A request Node cannot parse never reaches Express. Where the socket can still be written to,
 * it is answered in the contract's JSON error shape rather than with Node's bare status line.
 */
function answerClientErrors(server: Server) {
  server.on('clientError', (err: NodeJS.ErrnoException, socket: Duplex) => {
    if (!socket.writable || (socket as { _httpMessage?: unknown })._httpMessage) {
      socket.destroy();
      return;
    }
    if (err.code === 'HPE_HEADER_OVERFLOW') {
      const body = JSON.stringify(
        errorBody(
          'headers_too_large',
          `The request's headers are larger than ${MAX_HEADER_BYTES / 1024} KiB; shorten the URL or the cookies.`,
        ),
      );
      reply(socket, 431, 'Request Header Fields Too Large', body);
    } else if (err.code === 'ERR_HTTP_REQUEST_TIMEOUT') {
      reply(socket, 408, 'Request Timeout', JSON.stringify(errorBody('request_timeout', 'The request took too long to arrive.')));
    } else {
      reply(socket, 400, 'Bad Request', JSON.stringify(errorBody('bad_request', 'The request could not be read.')));
    }
  });
}

/**
 * How long a connection may sit idle between requests before the server closes it. Node's 5 s
 * means a person who logs an entry every minute opens a new connection for each, and over a
 * satellite link (650 ms each way) that is a round trip or three (TLS) before the entry even
 * leaves. A minute keeps their connection for the next one; the request head must still arrive
 * within `HEADERS_TIMEOUT_MS` of a request's start, and Node's own limit on a whole request stays.
 */
export const KEEP_ALIVE_TIMEOUT_MS = 60_000;
/** Longer than the keep-alive, as Node advises, so an idle connection is never cut as a request starts on it. */
export const HEADERS_TIMEOUT_MS = 65_000;

/** The HTTP server Bathynote runs on (and its tests): the header limit above, errors in JSON, connections kept a minute. */
export function createHttpServer(listener?: RequestListener): Server {
  const server = listener ? createServer(serverOptions, listener) : createServer(serverOptions);
  server.keepAliveTimeout = KEEP_ALIVE_TIMEOUT_MS;
  server.headersTimeout = HEADERS_TIMEOUT_MS;
  answerClientErrors(server);
  return server;
}
