import autocannon from 'autocannon';

import { demoIds, emails } from '../helpers/demo';
import { startTestServer } from '../helpers/test-server';

/** Observations logged as fast as the server takes them, over real HTTP with a real session. */
export async function benchLogWrites(): Promise<void> {
  const t = await startTestServer({ env: { AUTH_RATE_LIMIT: '1000', API_RATE_LIMIT: '1000000' } });
  try {
    const ids = demoIds(t.ctx.db);
    const login = await fetch(`${t.url}/api/auth/sign-in/email`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: t.url },
      body: JSON.stringify({ email: emails.biologist, password: 'bathynote-demo' }),
    });
    const cookie = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const rssBefore = process.memoryUsage().rss;
    const result = await autocannon({
      url: `${t.url}/api/dives/${ids.dive2026}/observations`,
      method: 'POST',
      connections: 20,
      duration: 10,
      headers: { cookie, 'content-type': 'application/json' },
      body: JSON.stringify({ kind: 'biology', title: 'Bench entry', depth: 600.5, tags: ['coral'], note: 'A *short* note.' }),
    });
    const n = t.ctx.db.$client.prepare("select count(*) n from observations where title = 'Bench entry'").get() as { n: number };
    process.stdout.write(
      [
        `20 connections for 10 s posting observations (synchronous=FULL, WAL)`,
        `  requests/s   ${result.requests.average.toFixed(0)}`,
        `  latency p50  ${result.latency.p50} ms   p99 ${result.latency.p99} ms   (at saturation each connection waits for the other 19: latency ≈ connections ÷ throughput; the 50 ms target is for the live load below)`,
        `  non-2xx      ${result.non2xx}   errors ${result.errors}   timeouts ${result.timeouts}`,
        `  stored       ${n.n} entries for ${result.requests.total} answers counted (requests still on their way when the run stopped are stored too)`,
        `  memory       rss ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MB (was ${(rssBefore / 2 ** 20).toFixed(0)} MB before the run)`,
        '',
      ].join('\n'),
    );
  } finally {
    await t.close();
  }
}
