import type { RequestHandler } from 'express';

/**
 * `Server-Timing: app;dur=…` on every API answer: how long the server itself took, so a reader on
 * a slow satellite link (and the benchmarks) can tell the server's time from the link's.
 */
export const serverTiming: RequestHandler = (_req, res, next) => {
  const start = process.hrtime.bigint();
  const writeHead = res.writeHead.bind(res) as (...args: unknown[]) => typeof res;
  res.writeHead = ((...args: unknown[]) => {
    if (!res.headersSent) res.setHeader('Server-Timing', `app;dur=${(Number(process.hrtime.bigint() - start) / 1e6).toFixed(1)}`);
    return writeHead(...args);
  }) as typeof res.writeHead;
  next();
};
