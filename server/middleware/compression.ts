import compression from 'compression';
import type { Request, RequestHandler, Response } from 'express';

/**
 * Types that must pass through untouched: the live stream (a compressor holds bytes back until
 * its block fills, so an event would wait instead of arriving at once) and files that are already
 * compressed (photos, video, archives), where a second pass only costs time.
 */
const UNCOMPRESSED = /^(text\/event-stream|image\/|video\/|audio\/|application\/(zip|gzip|x-gzip|octet-stream))/i;

function shouldCompress(req: Request, res: Response): boolean {
  const type = res.getHeader('Content-Type');
  if (typeof type === 'string' && UNCOMPRESSED.test(type)) return false;
  return compression.filter(req, res);
}

/**
 * Brotli or gzip for API answers, as the client asks (Accept-Encoding), with Vary set; answers
 * under 1 KB go as they are. The package's brotli quality (4) keeps the CPU cost per answer low.
 */
const compressor = compression({ filter: shouldCompress });

/**
 * The live streams skip the compressor altogether: it would pass them through anyway, but its
 * wrapper would still sit in every write to every reader, and a stream writes far more often than
 * any other answer.
 */
export const apiCompression: RequestHandler = (req, res, next) => (req.path.endsWith('/stream') ? next() : compressor(req, res, next));
