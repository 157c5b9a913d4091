/**
 * An entry the server acknowledged with 201 survives the server being killed (SIGKILL) in the
 * middle of concurrent writes, and the database file stays consistent. The same test against a
 * server that answers before committing finds acknowledged entries missing, which shows the test
 * can tell the difference.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';

import { startServerProcess } from '../helpers/server-process';

const ROUNDS = 10;
const WRITES = 40;
const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

type Sent = { clientRef: string; title: string; note: string };

async function killDuringWrites(script: string | undefined, round: number, dir: string) {
  const server = await startServerProcess({ LOG_LEVEL: 'silent' }, { script, dir, keepDir: true });
  const login = await fetch(`${server.url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: server.url },
    body: JSON.stringify({ email: 'biologist@bathynote.test', password: 'bathynote-demo' }),
  });
  const cookie = login.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  const db = new Database(path.join(dir, 'bathynote.db'), { readonly: true });
  // Any dive the biologist may log on: the test needs none of the demo's content.
  const diveId = (
    db
      .prepare(
        `select dives.id from dives join memberships on memberships.campaign_id = dives.campaign_id
         join user on user.id = memberships.user_id where user.email = 'biologist@bathynote.test' limit 1`,
      )
      .get() as { id: string }
  ).id;
  db.close();

  const acknowledged: Sent[] = [];
  let firstAck: () => void = () => undefined;
  const sawAck = new Promise<void>((r) => (firstAck = r));
  const writes = Array.from({ length: WRITES }, async (_, i) => {
    const sent: Sent = {
      clientRef: `round${round}-entry${i}-${Math.random().toString(36).slice(2, 10)}`,
      title: `Durability ${round}/${i}`,
      note: 'x'.repeat(200 + i),
    };
    try {
      const res = await fetch(`${server.url}/api/dives/${diveId}/observations`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', cookie },
        body: JSON.stringify({ kind: 'biology', ...sent }),
      });
      if (res.status === 201) {
        acknowledged.push(sent);
        firstAck();
      }
    } catch {
      // The server died under this request: it was never acknowledged.
    }
  });
  await Promise.race([sawAck, new Promise((r) => setTimeout(r, 10_000))]);
  await new Promise((r) => setTimeout(r, 20 + Math.random() * 60));
  const exited = server.child.exitCode === null ? new Promise((r) => server.child.once('exit', r)) : Promise.resolve();
  server.child.kill('SIGKILL');
  await Promise.all(writes);
  await exited;
  return acknowledged;
}

function check(dir: string, acknowledged: Sent[]) {
  const db = new Database(path.join(dir, 'bathynote.db'));
  try {
    const integrity = db.pragma('integrity_check', { simple: true });
    const find = db.prepare('select title, note from observations where client_ref = ?');
    const missing = acknowledged.filter((s) => {
      const row = find.get(s.clientRef) as { title: string; note: string } | undefined;
      return !row || row.title !== s.title || row.note !== s.note;
    });
    return { integrity, missing };
  } finally {
    db.close();
  }
}

describe('durability under SIGKILL', () => {
  it(`keeps every acknowledged entry whole over ${ROUNDS} kills`, async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-kill-'));
    dirs.push(dir);
    let total = 0;
    for (let round = 1; round <= ROUNDS; round++) {
      const acknowledged = await killDuringWrites(undefined, round, dir);
      total += acknowledged.length;
      const { integrity, missing } = check(dir, acknowledged);
      expect(integrity).toBe('ok');
      expect(missing, `round ${round}`).toEqual([]);
    }
    expect(total).toBeGreaterThan(ROUNDS);
  }, 300_000);

  it('notices a server that answers before it commits', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-kill-control-'));
    dirs.push(dir);
    let lost = 0;
    for (let round = 1; round <= 3; round++) {
      const acknowledged = await killDuringWrites('tests/fixtures/ack-before-commit-server.ts', round, dir);
      lost += check(dir, acknowledged).missing.length;
    }
    expect(lost).toBeGreaterThan(0);
  }, 120_000);
});
