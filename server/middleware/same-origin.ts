import type { RequestHandler } from 'express';

import { trustedOriginsFor } from '../auth';
import { errorBody } from '../errors';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Refuses a request that changes something when a browser says it comes from another site.
 * The session cookie is SameSite=Lax, which still rides along from another port of the same host
 * or a sibling subdomain; the `Origin` header (and `Sec-Fetch-Site` where a browser sends no
 * `Origin`) tells those apart. A caller sending neither is no browser and holds the cookie
 * itself, so it is let through. better-auth checks its own routes the same way.
 */
export function sameOrigin(publicUrl: string): RequestHandler {
  const trusted = new Set(trustedOriginsFor(new URL(publicUrl)));
  return (req, res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get('origin');
    const fetchSite = req.get('sec-fetch-site');
    const foreign =
      origin !== undefined ? !trusted.has(origin) : fetchSite !== undefined && fetchSite !== 'same-origin' && fetchSite !== 'none';
    if (!foreign) return next();
    res
      .status(403)
      .json(errorBody('foreign_origin', 'This request came from another site, so it was refused. Use Bathynote from its own address.'));
  };
}
