import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { openSse } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  // A short heartbeat, so the tests can see it and see a revoked session noticed on it.
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '200', STREAM_HEARTBEAT_MS: '300' } });
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

const streamUrl = () => `${t.url}/api/dives/${ids.dive}/stream`;

async function log(email: string, title: string) {
  const res = await (await t.signIn(email)).post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title });
  expect(res.status).toBe(201);
  return res.body as { id: string; version: number };
}

describe('the live dive log', () => {
  it('delivers entries, edits and retirements to a member as they happen', async () => {
    const reader = openSse(streamUrl(), { cookie: await t.sessionCookie(emails.guest) });
    expect(await reader.status).toBe(200);
    await reader.next((e) => e.event === 'ready');

    const created = await log(emails.biologist, 'Seen live: conger under the timbers');
    const got = await reader.next((e) => e.event === 'observation.created');
    expect(JSON.parse(got.data)).toMatchObject({ id: created.id, title: 'Seen live: conger under the timbers' });
    expect(Number(got.id)).toBeGreaterThan(0);

    const patched = await (
      await t.signIn(emails.biologist)
    )
      .patch(`/api/observations/${created.id}`)
      .send({ version: created.version, title: 'Conger, 1.5 m' });
    expect(patched.status, JSON.stringify(patched.body)).toBe(200);
    const updated = await reader.next((e) => e.event === 'observation.updated');
    expect(JSON.parse(updated.data)).toMatchObject({ id: created.id, title: 'Conger, 1.5 m', version: 2 });

    await (await t.signIn(emails.biologist)).delete(`/api/observations/${created.id}`);
    const retired = await reader.next((e) => e.event === 'observation.retired');
    expect(JSON.parse(retired.data)).toMatchObject({ id: created.id });

    await (await t.signIn(emails.pilot)).post(`/api/dives/${ids.dive}/phases`).send({ phase: 'on-deck', at: '2026-05-13T23:00:00.000Z' });
    const dive = await reader.next((e) => e.event === 'dive.updated');
    expect(JSON.parse(dive.data).phases.onDeck).toBe('2026-05-13T23:00:00.000Z');
    reader.close();
  });

  it('replays what a reader missed when it reconnects with Last-Event-ID', async () => {
    const cookie = await t.sessionCookie(emails.lead);
    const first = openSse(streamUrl(), { cookie });
    await first.next((e) => e.event === 'ready');
    await log(emails.biologist, 'Before the drop');
    const seen = await first.next((e) => e.event === 'observation.created' && e.data.includes('Before the drop'));
    first.close();

    const missedA = await log(emails.biologist, 'Missed one');
    const missedB = await log(emails.guest, 'Missed two');

    const again = openSse(streamUrl(), { cookie, 'last-event-id': seen.id! });
    const a = await again.next((e) => e.event === 'observation.created' && e.data.includes(missedA.id));
    const b = await again.next((e) => e.event === 'observation.created' && e.data.includes(missedB.id));
    expect(Number(a.id)).toBeLessThan(Number(b.id));
    expect(again.events.some((e) => e.data.includes('Before the drop'))).toBe(false);
    again.close();
  });

  it("tells a group commit's entries to a reader whole and in order, text outside ASCII included", async () => {
    const reader = openSse(streamUrl(), { cookie: await t.sessionCookie(emails.archaeologist) });
    await reader.next((e) => e.event === 'ready');
    const writer = await t.signIn(emails.biologist);
    // Sent at once, they share group commits, whose events each reader is sent in one write.
    const titles = Array.from({ length: 8 }, (_, i) => `Grenadier nº ${i} — près du câble, 3 °C`);
    const created = await Promise.all(
      titles.map((title) => writer.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title })),
    );
    expect(created.map((r) => r.status)).toEqual(titles.map(() => 201));
    await vi.waitFor(() => expect(reader.events.filter((e) => e.event === 'observation.created')).toHaveLength(titles.length), {
      timeout: 5000,
      interval: 20,
    });
    const told = reader.events.filter((e) => e.event === 'observation.created');
    const eventIds = told.map((e) => Number(e.id));
    expect(eventIds).toEqual([...eventIds].sort((a, b) => a - b));
    expect(told.map((e) => (JSON.parse(e.data) as { title: string }).title).sort()).toEqual([...titles].sort());
    reader.close();
  });

  it('sends a heartbeat comment regularly', async () => {
    const reader = openSse(streamUrl(), { cookie: await t.sessionCookie(emails.pilot) });
    await reader.next((e) => e.event === 'ready');
    // The first comment is the signal itself: no fixed wait, and a stream without heartbeats times out.
    await vi.waitFor(() => expect(reader.comments.filter((c) => c.startsWith('keep-alive')).length).toBeGreaterThanOrEqual(1), {
      timeout: 3000,
      interval: 50,
    });
    reader.close();
  });

  it('refuses anonymous readers with 401 and non-members with 404', async () => {
    const anon = openSse(streamUrl());
    expect(await anon.status).toBe(401);
    const outsider = openSse(streamUrl(), { cookie: await t.sessionCookie(emails.outsider) });
    expect(await outsider.status).toBe(404);
    const guest2024 = openSse(`${t.url}/api/dives/${ids.otherDive}/stream`, { cookie: await t.sessionCookie(emails.guest) });
    expect(await guest2024.status).toBe(404);
  });

  it('closes the stream on sign-out, and the old cookie then gets 401', async () => {
    const cookie = await t.sessionCookie(emails.biologist);
    const reader = openSse(streamUrl(), { cookie });
    await reader.next((e) => e.event === 'ready');
    const out = await fetch(`${t.url}/api/auth/sign-out`, {
      method: 'POST',
      headers: { cookie, origin: t.url, 'content-type': 'application/json' },
      body: '{}',
    });
    expect(out.status).toBe(200);
    await reader.ended;
    const again = openSse(streamUrl(), { cookie });
    expect(await again.status).toBe(401);
  });

  it('notices a session revoked elsewhere at the next heartbeat', async () => {
    const cookie = await t.sessionCookie(emails.guest);
    const reader = openSse(streamUrl(), { cookie });
    await reader.next((e) => e.event === 'ready');
    const token = decodeURIComponent(cookie.split('=')[1]!).split('.')[0];
    t.ctx.db.$client.prepare('delete from session where token = ?').run(token);
    await reader.ended;
  });
});

describe('a member removed while following a dive', () => {
  // The longest heartbeat allowed, far beyond the test's length: only the removal itself can close the stream.
  let quiet: TestServer;
  beforeAll(async () => {
    quiet = await startTestServer({ env: { STREAM_HEARTBEAT_MS: '25000' } });
  });
  afterAll(() => quiet.close());

  it('has their stream closed by the lead removing them, and cannot open it again', async () => {
    const qids = await buildFixtures(quiet);
    const url = `${quiet.url}/api/dives/${qids.dive}/stream`;
    const cookie = await quiet.sessionCookie(emails.pilot);
    const reader = openSse(url, { cookie });
    await reader.next((e) => e.event === 'ready');
    const lead = await quiet.signIn(emails.lead);
    const removed = await lead.delete(`/api/campaigns/${qids.campaign}/members/${qids.userId(emails.pilot)}`).set('Origin', quiet.url);
    expect(removed.status).toBe(200);
    await reader.ended;
    expect(await openSse(url, { cookie }).status).toBe(404);
  });
});
