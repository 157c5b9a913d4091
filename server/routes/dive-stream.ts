import { and, asc, eq, gt } from 'drizzle-orm';
import type { RequestHandler } from 'express';

import { liveEvents, session } from '../../db/schema';
import type { AppContext } from '../context';
import { accessOf, roleIn } from '../middleware/campaign-access';
import { userOf } from '../middleware/session';
import { ApiError } from '../errors';
import { relayedSince, shoreVouchesFor } from '../mirror/mirror';
import { sseFrame, type ToldEvents } from '../services/live';
import { streamRegistry } from '../services/stream-caps';

/** More missed events than this and the reader is told to reload instead. */
const REPLAY_LIMIT = 2000;
/** A reader that stops reading is cut off before its buffer grows without bound. */
const MAX_BUFFERED_BYTES = 4 * 1024 * 1024;

/**
 * The told events as one HTTP/1.1 chunk (size in hex, CRLF, the bytes, CRLF: RFC 9112 section
 * 7.1), encoded once for all of a dive's readers.
 */
const chunks = new WeakMap<ToldEvents, Buffer>();
function chunkOf(told: ToldEvents): Buffer {
  let chunk = chunks.get(told);
  if (!chunk) {
    chunk = Buffer.from(`${Buffer.byteLength(told.frames).toString(16)}\r\n${told.frames}\r\n`);
    chunks.set(told, chunk);
  }
  return chunk;
}

/**
 * `GET /api/dives/:diveId/stream`: the dive's changes as Server-Sent Events. A reconnect with
 * `Last-Event-ID` first gets every event it missed, from the database; then live ones. The
 * stream closes when its session ends or its member loses access to the campaign.
 */
export function diveStream({ db, live, env }: AppContext): RequestHandler {
  const streams = streamRegistry({
    perSession: env.STREAM_MAX_PER_SESSION,
    perPerson: env.STREAM_MAX_PER_PERSON,
    total: env.STREAM_MAX_TOTAL,
  });
  return (req, res) => {
    const user = userOf(req);
    const { campaignId } = accessOf(req);
    const diveId = req.params.diveId as string;
    const token = req.sessionToken;
    const lastSeen = Number(req.get('last-event-id') ?? req.query.lastEventId ?? NaN);

    let closed = false;
    const cleanups: (() => void)[] = [];
    const close = () => {
      if (closed) return;
      closed = true;
      for (const c of cleanups) c();
      res.end();
    };
    const uncork = () => res.uncork();
    const send = (chunk: string) => {
      if (closed) return;
      // Events told in the same turn (a group commit's entries) leave in one write to the socket.
      if (!res.writableCorked) {
        res.cork();
        process.nextTick(uncork);
      }
      res.write(chunk);
      if (res.writableLength > MAX_BUFFERED_BYTES) close();
    };
    /**
     * Live events go straight to the socket as one chunk already framed, shared by every reader:
     * through `res.write` each reader's copy was framed, encoded and corked on its own, and with
     * two hundred readers that held the event loop while writes waited. Node writes a response's
     * output to its socket as soon as the socket is the response's (`res.socket` is set only
     * then), so these bytes keep their place among the response's own writes. A response that is
     * not chunked (an HTTP/1.0 reader) or has no socket yet takes the ordinary way.
     */
    const tell = (told: ToldEvents) => {
      if (closed) return;
      const socket = res.socket;
      if (!socket || !res.chunkedEncoding) return send(told.frames);
      if (!socket.writable) return close();
      socket.write(chunkOf(told));
      if (res.writableLength > MAX_BUFFERED_BYTES) close();
    };
    const admitted = streams.admit({
      sessionToken: token ?? '',
      userId: user.id,
      // Its last event says why, so the reader stops instead of reconnecting and closing the newer one.
      displace: (why) => {
        send(`event: stream.closed\ndata: ${JSON.stringify(why)}\n\n`);
        close();
      },
    });
    if (!admitted)
      throw new ApiError(429, 'too_many_streams', 'The server has as many live streams open as it may; try again in a minute.');
    cleanups.push(admitted.release);

    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-cache, no-transform');
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    req.socket.setNoDelay(true);
    res.write('retry: 3000\n\n');

    if (Number.isInteger(lastSeen) && lastSeen >= 0) {
      const missed = db
        .select()
        .from(liveEvents)
        .where(and(eq(liveEvents.diveId, diveId), gt(liveEvents.id, lastSeen)))
        .orderBy(asc(liveEvents.id))
        .limit(REPLAY_LIMIT + 1)
        .all();
      if (missed.length > REPLAY_LIMIT) send(`event: resync\ndata: {}\n\n`);
      else {
        for (const e of missed) send(sseFrame(e.id, e.type, e.payload));
        // A shore mirror also replays what it relayed that its restored copy does not hold yet.
        for (const e of relayedSince(live, diveId, lastSeen)) send(e.frame);
      }
    } else {
      send(`event: ready\ndata: {}\n\n`);
    }

    const stillAllowed = () => {
      if (!token) return false;
      const s = db.select({ expiresAt: session.expiresAt }).from(session).where(eq(session.token, token)).get();
      // Ashore, a session the copy does not hold yet counts while the ship's answer about it holds.
      const current = s ? s.expiresAt > new Date() : shoreVouchesFor(live, token);
      return current && !!roleIn(db, campaignId, user);
    };

    cleanups.push(live.subscribe(diveId, tell));
    cleanups.push(
      live.onSessionEnded((ended) => {
        if (ended === token) close();
      }),
    );
    cleanups.push(
      // Removed or given another role: the stream closes either way, and a reader still allowed
      // opens it again under its new role.
      live.onMembershipChanged((change) => {
        if (change.userId === user.id && change.campaignId === campaignId) close();
      }),
    );
    const heartbeat = setInterval(() => {
      if (!stillAllowed()) close();
      // A bare comment keeps proxies from closing an idle stream: fourteen bytes on a thin link.
      else send(': keep-alive\n\n');
    }, env.STREAM_HEARTBEAT_MS);
    cleanups.push(() => clearInterval(heartbeat));
    req.on('close', close);
  };
}
