import type { Request, RequestHandler } from 'express';
import type { z } from 'zod';

/**
 * Parses the body or the query with a contract schema and keeps the parsed value for the handler
 * (`validator.of(req)`), typed. Placed after the role check, so a stranger gets 404 before any
 * 400 could tell them what the route expects. A failure reaches the error handler as a 400 with
 * the fields' issues.
 */
export function validate<S extends z.ZodType>(schema: S, from: 'body' | 'query' = 'body') {
  const parsed = new WeakMap<Request, z.output<S>>();
  const middleware: RequestHandler = (req, _res, next) => {
    parsed.set(req, schema.parse(req[from]));
    next();
  };
  return Object.assign(middleware, {
    of(req: Request): z.output<S> {
      if (!parsed.has(req)) throw new Error('validate() must run before the handler that reads its value');
      return parsed.get(req) as z.output<S>;
    },
  });
}
