import { existsSync, writeFileSync } from 'node:fs';
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { backupDatabase, restoreDatabase } from '@/db/backup';
import { openDatabase } from '@/db/client';
import { emails } from '../helpers/demo';
import { buildFixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
beforeAll(async () => {
  t = await startTestServer();
});
afterAll(() => t.close());

describe('backup and restore', () => {
  it('backs up while the server writes, and a restore brings back exactly that state', async () => {
    const ids = await buildFixtures(t);
    const agent = await t.signIn(emails.biologist);
    const log = (title: string) => agent.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title });

    const kept = await log('Logged before the backup');
    expect(kept.status).toBe(201);
    const file = path.join(t.dir, 'backups', 'copy.db');
    const writes = Array.from({ length: 10 }, (_, i) => log(`Logged during the backup ${i}`));
    await backupDatabase(t.ctx.db, file);
    await Promise.all(writes);
    const after = await log('Logged after the backup');
    expect(after.status).toBe(201);

    const target = path.join(t.dir, 'restored', 'bathynote.db');
    expect(restoreDatabase(file, target).keptAs).toBeNull();
    const restored = openDatabase(target);
    const titles = restored.$client.prepare('select title from observations').pluck().all() as string[];
    restored.$client.close();
    expect(titles).toContain('Logged before the backup');
    expect(titles).not.toContain('Logged after the backup');
    expect(titles.length).toBeGreaterThan(80);

    // Restoring over an existing database keeps the old one aside instead of deleting it.
    const second = restoreDatabase(file, target);
    expect(second.keptAs).not.toBeNull();
    expect(existsSync(second.keptAs!)).toBe(true);
  });

  it('refuses a file that is not a Bathynote database', () => {
    const junk = path.join(t.dir, 'junk.db');
    writeFileSync(junk, 'not a database at all');
    expect(() => restoreDatabase(junk, path.join(t.dir, 'x', 'bathynote.db'))).toThrow();
    expect(existsSync(path.join(t.dir, 'x', 'bathynote.db'))).toBe(false);
  });
});
