import type { RequestHandler } from 'express';

import { roleIn } from '../middleware/campaign-access';
import type { Mirror } from './mirror';

type Entry = { id: string; observedAt: string; version?: number; retiredAt?: string | null };

const LIST = /^\/dives\/([^/]+)\/observations$/;
const ONE = /^\/observations\/([^/]+)$/;
/** The list's query keys that leave the first page by time unfiltered. */
const PLAIN_KEYS = new Set(['limit', 'sort', 'order']);

/**
 * A dive's log read from the shore copy keeps the entries its readers already saw arrive live:
 * until a restored copy holds them, the relayed state of each entry replaces the copy's older one
 * in any page, and on the first page of the plain log by time (newest first) the entries the copy
 * lacks are added. The route itself decides who may read the dive; this only amends its answer.
 */
export function keepRelayedEntries(mirror: Mirror): RequestHandler {
  const one = keepRelayedEntry(mirror);
  return (req, res, next) => {
    if (req.method === 'GET' && ONE.test(req.path)) return one(req, res, next);
    const match = req.method === 'GET' ? LIST.exec(req.path) : null;
    if (!match) return next();
    const pending = mirror.pendingEntries(decodeURIComponent(match[1]!));
    if (pending.size === 0) return next();
    const plain =
      Object.keys(req.query).every((k) => PLAIN_KEYS.has(k)) &&
      (req.query.sort ?? 'time') === 'time' &&
      (req.query.order ?? 'desc') === 'desc';
    const json = res.json.bind(res);
    res.json = (body: unknown) => {
      if (res.statusCode !== 200 || !body || typeof body !== 'object' || !Array.isArray((body as { items?: unknown }).items))
        return json(body);
      const page = body as { items: Entry[] };
      const seen = new Set<string>();
      let items = page.items.map((item) => {
        seen.add(item.id);
        const newer = pending.get(item.id) as Entry | undefined;
        return newer && (newer.version ?? 0) >= (item.version ?? 0) ? newer : item;
      });
      if (plain) {
        const added = [...pending.values()].map((e) => e as Entry).filter((e) => !seen.has(e.id) && !e.retiredAt);
        if (added.length > 0) {
          // Nothing is cut from the page's end, so the next page (keyed on its last entry) skips nothing.
          items = [...items, ...added].sort((a, b) =>
            a.observedAt === b.observedAt ? (a.id < b.id ? 1 : -1) : a.observedAt < b.observedAt ? 1 : -1,
          );
        }
      }
      return json({ ...page, items });
    };
    next();
  };
}

/**
 * One entry read from the shore copy: when a newer state of it was relayed than the copy holds,
 * that state is answered; when the copy does not hold the entry at all (the route answers 404),
 * the relayed entry is answered instead to a signed-in member of its campaign, so opening an entry
 * seen arriving live never fails. Anyone else keeps the route's own answer (404 to an outsider).
 */
function keepRelayedEntry(mirror: Mirror): RequestHandler {
  return (req, res, next) => {
    const pending = mirror.pendingEntry(decodeURIComponent(ONE.exec(req.path)![1]!));
    if (!pending) return next();
    const newer = pending.payload as Entry;
    const json = res.json.bind(res);
    res.json = (body: unknown) => {
      if (res.statusCode === 200 && body && typeof body === 'object') {
        const held = body as Entry;
        return json((newer.version ?? 0) >= (held.version ?? 0) ? { ...held, ...newer } : held);
      }
      const db = mirror.copy;
      if (res.statusCode === 404 && req.user && db && roleIn(db, pending.campaignId, req.user)) {
        res.status(200);
        return json(newer);
      }
      return json(body);
    };
    next();
  };
}
