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

/** The HTTP server Bathynote runs on (and its tests): the header limit above, errors in JSON. */
export function createHttpServer(listener?: RequestListener): Server {
  const server = listener ? createServer(serverOptions, listener) : createServer(serverOptions);
  answerClientErrors(server);
  return server;
}
