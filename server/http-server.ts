import { createServer, IncomingMessage, ServerResponse, type RequestListener, type Server, type ServerOptions } from 'node:http';
import type { Socket } from 'node:net';
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

/** An Express app's prototypes for requests and responses (`app.request`, `app.response`). */
export type AppPrototypes = { request: object; response: object };

/** Where each server's requests and responses take their prototypes from (see `bornFor`). */
const births = new WeakMap<Server, (app: AppPrototypes) => void>();

/**
 * Request and response constructors for Node's HTTP server whose prototype can be set later, once
 * the app exists. Express gives every request and response its app's prototype as it starts on
 * it (Object.setPrototypeOf). Measured with V8's --trace-gc-nvp, that made about 9 KB of every
 * request on bare Express survive the next young-generation collection and move to the old
 * generation, to wait there for a full collection; on Node's own server almost nothing does. A
 * request born with the app's prototype is left as it is (setting an object's prototype to the
 * one it has is no change) and dies young: bare Express then promotes almost nothing, and
 * Bathynote's entry path 10 KB an entry instead of 24.
 */
function messageConstructors() {
  // Only their `prototype` is used: Reflect.construct gives the new object new.target's.
  const requestTarget = function AppRequestPrototype() {};
  const responseTarget = function AppResponsePrototype() {};
  requestTarget.prototype = IncomingMessage.prototype;
  responseTarget.prototype = ServerResponse.prototype;
  function AppRequest(socket: Socket) {
    return Reflect.construct(IncomingMessage, [socket], requestTarget) as IncomingMessage;
  }
  function AppResponse(req: IncomingMessage, options?: object) {
    return Reflect.construct(ServerResponse, [req, options], responseTarget) as ServerResponse;
  }
  return {
    IncomingMessage: AppRequest as unknown as typeof IncomingMessage,
    ServerResponse: AppResponse as unknown as typeof ServerResponse,
    bornFor: (app: AppPrototypes) => {
      requestTarget.prototype = app.request as IncomingMessage;
      responseTarget.prototype = app.response as ServerResponse;
    },
  };
}

/** The HTTP server Bathynote runs on (and its tests): the header limit above, errors in JSON, connections kept a minute. */
export function createHttpServer(listener?: RequestListener): Server {
  const { bornFor: born, ...constructors } = messageConstructors();
  const options: ServerOptions = { ...serverOptions, ...constructors };
  const server = listener ? createServer(options, listener) : createServer(options);
  births.set(server, born);
  server.keepAliveTimeout = KEEP_ALIVE_TIMEOUT_MS;
  server.headersTimeout = HEADERS_TIMEOUT_MS;
  answerClientErrors(server);
  return server;
}

/**
 * From now on, the server's requests and responses are born with this Express app's prototypes,
 * the ones the app would give them (see `messageConstructors`). Requests the app does not handle
 * are not harmed: the app's prototypes inherit Node's own.
 */
export function bornFor(server: Server, app: AppPrototypes): void {
  births.get(server)?.(app);
}
