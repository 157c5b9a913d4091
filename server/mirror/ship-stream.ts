import { timingSafeEqual } from 'node:crypto';

import { asc, gt } from 'drizzle-orm';
import type { RequestHandler } from 'express';

import { liveEvents } from '../../db/schema';
import type { AppContext } from '../context';
import { errorBody } from '../errors';

/** More missed events than this and the mirror is told to wait for its next restored copy instead. */
const REPLAY_LIMIT = 2000;
const MAX_BUFFERED_BYTES = 8 * 1024 * 1024;

const frameOf = (id: number, type: string, campaignId: string, diveId: string, at: Date, payload: unknown) =>
  `id: ${id}\nevent: ${type}\ndata: ${JSON.stringify({ campaignId, diveId, at: at.toISOString(), payload })}\n\n`;

function sameSecret(given: string, key: string): boolean {
  const a = Buffer.from(given);
  const b = Buffer.from(key);
  return a.length === b.length && timingSafeEqual(a, b);
}

/**
 * `GET /api/mirror/stream` on the ship: every dive's live events for a shore mirror, which relays
 * them to its own readers, so the link carries each event once however many read ashore. Open to
 * the holder of `MIRROR_KEY` only; without the key (or with none set) the path does not exist.
 */
export function mirrorStream({ db, live, env }: AppContext): RequestHandler {
  return (req, res) => {
    const key = env.MIRROR_KEY;
    if (!key || !sameSecret(req.get('x-mirror-key') ?? '', key)) {
      res.status(404).json(errorBody('not_found', 'There is nothing at this address.'));
      return;
    }
    let closed = false;
    const close = () => {
      if (closed) return;
      closed = true;
      unsubscribe();
      unsubscribeEnded();
      clearInterval(heartbeat);
      res.end();
    };
    const send = (chunk: string) => {
      if (closed) return;
      res.write(chunk);
      if (res.writableLength > MAX_BUFFERED_BYTES) close();
    };
    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-cache, no-transform');
    res.flushHeaders();
    req.socket.setNoDelay(true);
    const lastSeen = Number(req.get('last-event-id') ?? NaN);
    // Events committed while the replay is read are told live too; the mirror drops repeats by id.
    const unsubscribe = live.subscribeAll((e) => send(frameOf(e.id, e.type, e.campaignId, e.diveId, e.at, e.payload)));
    // A session that ends on the ship is refused ashore on its next request, not at the next copy.
    // The token of an ended session opens nothing any more, so it may cross the link as it is.
    const unsubscribeEnded = live.onSessionEnded((token) => send(`event: session.ended\ndata: ${JSON.stringify({ token })}\n\n`));
    if (Number.isInteger(lastSeen) && lastSeen >= 0) {
      const missed = db
        .select()
        .from(liveEvents)
        .where(gt(liveEvents.id, lastSeen))
        .orderBy(asc(liveEvents.id))
        .limit(REPLAY_LIMIT + 1)
        .all();
      if (missed.length <= REPLAY_LIMIT) for (const e of missed) send(frameOf(e.id, e.type, e.campaignId, e.diveId, e.at, e.payload));
    }
    const heartbeat = setInterval(() => send(': keep-alive\n\n'), env.STREAM_HEARTBEAT_MS);
    req.on('close', close);
  };
}
