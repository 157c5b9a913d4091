import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { migrateDatabase, openDatabase, type Db, type Executor } from '@/db/client';
import { inJsonList, preparedOn } from '@/db/prepared';
import { tags } from '@/db/schema';
import { seedDemo } from '@/db/seed';
import { namesOf } from '@/server/services/observations';

/**
 * Queries on the write path are built once per connection and reused, inside transactions too;
 * an id list travels as one JSON parameter, so one prepared query serves a list of any length.
 */

let dir: string;
let db: Db;
beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), 'bathynote-prepared-'));
  db = openDatabase(path.join(dir, 'bathynote.db'));
  migrateDatabase(db);
  await seedDemo(db);
});
afterAll(() => {
  db.$client.close();
  rmSync(dir, { recursive: true, force: true });
});

const tagsNamed = (exec: Executor) =>
  exec.select({ name: tags.name }).from(tags).where(inJsonList(tags.name, 'names')).orderBy(tags.name).prepare();

describe('preparedOn', () => {
  it('builds a query once per connection, and a transaction on the connection gets the same one', () => {
    let builds = 0;
    const counted = (exec: Executor) => {
      builds++;
      return tagsNamed(exec);
    };
    const outside = preparedOn(db, counted);
    const inside = db.transaction((tx) => preparedOn(tx, counted));
    expect(inside).toBe(outside);
    expect(builds).toBe(1);

    const other = openDatabase(path.join(dir, 'bathynote.db'));
    try {
      expect(preparedOn(other, counted)).not.toBe(outside);
      expect(builds).toBe(2);
    } finally {
      other.$client.close();
    }
  });

  it('runs inside a transaction and sees that transaction’s own writes, which roll back with it', () => {
    const campaignId = (db.$client.prepare('select id from campaigns limit 1').get() as { id: string }).id;
    const find = (exec: Executor) => preparedOn(exec, tagsNamed).all({ names: JSON.stringify(['zz-prepared-probe']) });
    expect(() =>
      db.transaction((tx) => {
        tx.insert(tags).values({ campaignId, name: 'zz-prepared-probe' }).run();
        expect(find(tx)).toEqual([{ name: 'zz-prepared-probe' }]);
        throw new Error('roll back');
      }),
    ).toThrow('roll back');
    expect(find(db)).toEqual([]);
  });
});

describe('inJsonList', () => {
  it('matches every value of a list longer than SQLite allows parameters, through one statement', () => {
    const names = (db.$client.prepare('select name from user').pluck().all() as string[]).sort();
    const ids = db.$client.prepare('select id from user').pluck().all() as string[];
    // 40,000 ids, most of them unknown: more than SQLite's 32,766 bound parameters.
    const many = [...ids, ...Array.from({ length: 40_000 }, (_, i) => `no-such-person-${i}`)];
    const found = namesOf(db, many);
    expect([...found.values()].sort()).toEqual(names);
    expect(namesOf(db, [ids[0]!]).size).toBe(1);
    expect(namesOf(db, ['no-such-person']).size).toBe(0);
  });

  it('takes values as data, never as SQL', () => {
    const hostile = ["x') or 1=1 --", '"; drop table tags; --'];
    expect(preparedOn(db, tagsNamed).all({ names: JSON.stringify(hostile) })).toEqual([]);
    expect(
      db
        .select({ n: sql<number>`count(*)` })
        .from(tags)
        .get()!.n,
    ).toBeGreaterThan(0);
  });
});
