import { request } from 'node:http';

export type SseEvent = { id?: string; event: string; data: string };

export type SseClient = {
  status: Promise<number>;
  events: SseEvent[];
  comments: string[];
  ended: Promise<void>;
  /** Resolves with the first event (already received or still to come) that matches. */
  next: (match: (e: SseEvent) => boolean, timeoutMs?: number) => Promise<SseEvent>;
  close: () => void;
};

/** A plain Server-Sent Events reader over real HTTP, so tests see exactly what a browser would. */
export function openSse(url: string, headers: Record<string, string> = {}): SseClient {
  const events: SseEvent[] = [];
  const comments: string[] = [];
  const waiters: { match: (e: SseEvent) => boolean; resolve: (e: SseEvent) => void }[] = [];
  let resolveStatus!: (s: number) => void;
  let resolveEnded!: () => void;
  const status = new Promise<number>((r) => (resolveStatus = r));
  const ended = new Promise<void>((r) => (resolveEnded = r));

  const req = request(url, { headers: { accept: 'text/event-stream', ...headers } }, (res) => {
    resolveStatus(res.statusCode ?? 0);
    res.setEncoding('utf8');
    let buffer = '';
    res.on('data', (chunk: string) => {
      buffer += chunk;
      let cut: number;
      while ((cut = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, cut);
        buffer = buffer.slice(cut + 2);
        const e: SseEvent = { event: 'message', data: '' };
        const data: string[] = [];
        for (const line of block.split('\n')) {
          if (line.startsWith(':')) comments.push(line.slice(1).trim());
          else if (line.startsWith('id: ')) e.id = line.slice(4);
          else if (line.startsWith('event: ')) e.event = line.slice(7);
          else if (line.startsWith('data: ')) data.push(line.slice(6));
        }
        if (data.length === 0 && !e.id) continue;
        e.data = data.join('\n');
        events.push(e);
        for (const w of [...waiters]) {
          if (w.match(e)) {
            waiters.splice(waiters.indexOf(w), 1);
            w.resolve(e);
          }
        }
      }
    });
    res.on('end', resolveEnded);
    res.on('close', resolveEnded);
  });
  req.on('error', () => {
    resolveStatus(0);
    resolveEnded();
  });
  req.end();

  return {
    status,
    events,
    comments,
    ended,
    next: (match, timeoutMs = 5000) => {
      const seen = events.find(match);
      if (seen) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(
          () => reject(new Error(`no matching event within ${timeoutMs} ms; got ${JSON.stringify(events)}`)),
          timeoutMs,
        );
        waiters.push({
          match,
          resolve: (e) => {
            clearTimeout(timer);
            resolve(e);
          },
        });
      });
    },
    close: () => req.destroy(),
  };
}
