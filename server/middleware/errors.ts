import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';

import { ApiError, notFound } from '../errors';
import type { Logger } from '../services/logger';

export function zodIssues(error: ZodError) {
  return error.issues.map((i) => ({
    path: i.path.map(String).join('.') || '(body)',
    message: i.message,
    code: i.code,
  }));
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(notFound(`No such endpoint: ${req.method} ${req.path}`));
};

/** Turns every failure into the contract's JSON error shape; never a stack trace or an HTML page. */
export function errorHandler(log: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    const apiError = toApiError(err);
    if (apiError.status >= 500) log.error('request failed', { method: req.method, path: req.path, err });
    if (res.headersSent) {
      res.end();
      return;
    }
    res.status(apiError.status).json(apiError.toBody());
  };
}

function toApiError(err: unknown): ApiError {
  if (err instanceof ApiError) return err;
  if (err instanceof ZodError) {
    return new ApiError(400, 'validation_failed', 'Some fields are not valid.', zodIssues(err));
  }
  const e = err as { type?: string; status?: number; code?: string } | null;
  if (e?.type === 'entity.parse.failed') return new ApiError(400, 'malformed_json', 'The body is not valid JSON.');
  if (e?.type === 'entity.too.large' || e?.code === 'LIMIT_FILE_SIZE') {
    return new ApiError(413, 'too_large', 'The request body is too large.');
  }
  if (e?.type === 'encoding.unsupported' || e?.type === 'charset.unsupported') {
    return new ApiError(415, 'unsupported_encoding', 'Send the body as UTF-8 JSON.');
  }
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
    return new ApiError(e.status, 'bad_request', 'The request could not be read.');
  }
  return new ApiError(500, 'internal', 'Something went wrong on the server. The error has been logged.');
}
