import { Agent, request } from 'node:http';

export type WriteRound = {
  /** Milliseconds from the moment each entry was due to the end of its answer. */
  latencies: number[];
  /** The server's own time per entry, from its Server-Timing header. */
  serverMs: number[];
  /** How long after its due instant the bench itself got round to sending each entry (its own busyness, not the server's). */
  lateMs: number[];
  /** Milliseconds from the moment each entry was sent (not when it was due) to the end of its answer. */
  fromSend: number[];
  sent: number;
  non2xx: number;
  errors: number;
  seconds: number;
};

type Writer = { cookie: string; agent: Agent };

/** An answer slower than this counts as an error (and the bench goes on). */
const REQUEST_TIMEOUT_MS = 30_000;

/**
 * People logging a dive, each on a keep-alive connection of their own.
 *
 * The schedule is open-loop: every writer has its entries due at fixed instants, and an entry's
 * latency runs from the instant it was due, so a slow answer that delays the writer's next entry
 * is counted against the server rather than hidden. (autocannon's `overallRate` sends every
 * connection's quota for the second at the top of that second, all connections together, which
 * measures a crowd pressing "send" in the same instant rather than people logging; that case is
 * measured separately, by `herd`.)
 */
export class Writers {
  private readonly writers: Writer[];

  constructor(
    private readonly url: string,
    cookies: string[],
    private readonly body: () => string,
  ) {
    this.writers = cookies.map((cookie) => ({ cookie, agent: new Agent({ keepAlive: true, maxSockets: 1 }) }));
  }

  /** Each writer sends one entry every `intervalMs` for `seconds`, the writers' turns spread evenly. */
  schedule(intervalMs: number, seconds: number): Promise<WriteRound> {
    const start = performance.now() + 50;
    const end = start + seconds * 1000;
    const dues: { writer: Writer; due: number }[] = [];
    this.writers.forEach((writer, i) => {
      for (let due = start + (i * intervalMs) / this.writers.length; due < end; due += intervalMs) dues.push({ writer, due });
    });
    return this.run(dues, seconds);
  }

  /** Every writer sends at the same instant, `rounds` times, a second apart: the worst case of a busy moment. */
  herd(rounds: number): Promise<WriteRound> {
    const start = performance.now() + 50;
    const dues = Array.from({ length: rounds }, (_, k) => this.writers.map((writer) => ({ writer, due: start + k * 1000 }))).flat();
    return this.run(dues, rounds);
  }

  close() {
    for (const w of this.writers) w.agent.destroy();
  }

  private run(dues: { writer: Writer; due: number }[], seconds: number): Promise<WriteRound> {
    const round: WriteRound = { latencies: [], serverMs: [], lateMs: [], fromSend: [], sent: 0, non2xx: 0, errors: 0, seconds };
    return new Promise((resolve) => {
      let pending = dues.length;
      const done = () => {
        if (--pending === 0) resolve(round);
      };
      for (const { writer, due } of dues) {
        setTimeout(() => this.send(writer, due, round, done), Math.max(0, due - performance.now()));
      }
    });
  }

  private send(writer: Writer, due: number, round: WriteRound, finished: () => void, again?: string, firstSent = performance.now()) {
    const retried = again !== undefined;
    const payload = again ?? this.body();
    if (!retried) {
      round.sent++;
      round.lateMs.push(firstSent - due);
    }
    let settled = false;
    const done = () => {
      if (settled) return;
      settled = true;
      finished();
    };
    const failed = () => {
      if (settled) return;
      round.errors++;
      done();
    };
    const req = request(
      `${this.url}`,
      {
        method: 'POST',
        agent: writer.agent,
        headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(payload), cookie: writer.cookie },
      },
      (res) => {
        res.resume();
        res.on('aborted', failed);
        res.on('error', failed);
        res.on('end', () => {
          if (settled) return;
          round.latencies.push(performance.now() - due);
          round.fromSend.push(performance.now() - firstSent);
          if ((res.statusCode ?? 0) < 200 || (res.statusCode ?? 0) >= 300) round.non2xx++;
          const dur = /dur=([\d.]+)/.exec(String(res.headers['server-timing'] ?? ''));
          if (dur) round.serverMs.push(Number(dur[1]));
          done();
        });
      },
    );
    req.setTimeout(REQUEST_TIMEOUT_MS, () => req.destroy(new Error('timed out')));
    req.on('error', (err: NodeJS.ErrnoException) => {
      // A kept-alive socket the server closed as this request went out (an idle timeout no
      // longer than this schedule's interval): sent again once on a new socket, as a browser would.
      if (!retried && req.reusedSocket && err.code === 'ECONNRESET') {
        settled = true;
        this.send(writer, due, round, finished, payload, firstSent);
        return;
      }
      failed();
    });
    req.end(payload);
  }
}

export function percentile(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}
