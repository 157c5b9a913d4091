/**
 * The readers ashore, in a process of their own so that following the stream does not slow the
 * process that writes: opens N streams of one dive. Each line on stdin ("report" or "stop") makes
 * it print, as one JSON line, what it received since the last report (count, and delay from the
 * entry's creation on the server); "stop" then closes the streams and exits.
 */
import { openSse } from '../helpers/sse';

const [url, count, ...cookies] = process.argv.slice(2);
const readers = Array.from({ length: Number(count) }, (_, i) => openSse(url!, { cookie: cookies[i % cookies.length]! }));
const delays: number[] = [];
let received = 0;
const createdAt = /"createdAt":"([^"]+)"/;

void Promise.all(readers.map((r) => r.next((e) => e.event === 'ready', 60_000))).then(() => process.stdout.write('ready\n'));

setInterval(() => {
  const now = Date.now();
  for (const r of readers) {
    while (r.events.length > 0) {
      const e = r.events.shift()!;
      if (e.event !== 'observation.created') continue;
      received++;
      delays.push(now - Date.parse(createdAt.exec(e.data)?.[1] ?? ''));
    }
  }
}, 5);

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;

process.stdin.setEncoding('utf8');
process.stdin.on('data', (command: string) => {
  const stop = command.includes('stop');
  if (stop) for (const r of readers) r.close();
  const sorted = delays.splice(0).sort((a, b) => a - b);
  const summary = { received, p50: percentile(sorted, 50), p99: percentile(sorted, 99), max: sorted[sorted.length - 1] ?? NaN };
  received = 0;
  // Exit only once the line has reached the pipe: a pending write would be cut off.
  process.stdout.write(`${JSON.stringify(summary)}\n`, () => {
    if (stop) process.exit(0);
  });
});
