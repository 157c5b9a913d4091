/**
 * Live streams are bounded: per session and per person a new stream closes the oldest, which is
 * told why in a last event; past the process's ceiling a new stream is refused with 429.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { openSse, type SseClient } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer({ env: { STREAM_MAX_PER_SESSION: '2', STREAM_MAX_PER_PERSON: '3', STREAM_MAX_TOTAL: '5' } });
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

const url = () => `${t.url}/api/dives/${ids.dive}/stream`;
const opened: SseClient[] = [];
afterAll(() => opened.forEach((s) => s.close()));

async function open(cookie: string): Promise<SseClient> {
  const s = openSse(url(), { cookie });
  opened.push(s);
  expect(await s.status).toBe(200);
  await s.next((e) => e.event === 'ready');
  return s;
}

async function closedBecause(s: SseClient): Promise<string> {
  const last = await s.next((e) => e.event === 'stream.closed');
  await s.ended;
  return (JSON.parse(last.data) as { reason: string }).reason;
}

describe('open live streams', () => {
  it('close the oldest of a session, then of a person, and refuse past the process ceiling with 429', async () => {
    const first = await t.sessionCookie(emails.biologist);
    const a = await open(first);
    const b = await open(first);
    const c = await open(first);
    expect(await closedBecause(a)).toBe('session_stream_limit');

    // A second session of the same person: three streams of hers are allowed in all.
    const second = await t.sessionCookie(emails.biologist);
    const d = await open(second);
    const e = await open(second);
    expect(await closedBecause(b)).toBe('person_stream_limit');

    // The streams left open still carry the dive's changes.
    const posted = await (
      await t.signIn(emails.pilot)
    )
      .post(`/api/dives/${ids.dive}/observations`)
      .send({ kind: 'operations', title: 'Cap check' });
    expect(posted.status).toBe(201);
    for (const s of [c, d, e]) await s.next((ev) => ev.event === 'observation.created' && ev.data.includes(posted.body.id));
    expect(a.events.some((ev) => ev.data.includes(posted.body.id))).toBe(false);

    // Five open in the process: another person's stream is refused in the contract's shape.
    const guest = await t.sessionCookie(emails.guest);
    await open(guest);
    await open(guest);
    const refused = await fetch(url(), { headers: { cookie: await t.sessionCookie(emails.lead), accept: 'text/event-stream' } });
    expect(refused.status).toBe(429);
    expect(((await refused.json()) as { error: { code: string } }).error.code).toBe('too_many_streams');
  });
});
