import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import { generateSQLiteDrizzleJson, generateSQLiteMigration } from 'drizzle-kit/api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { migrateDatabase, openDatabase, type Db } from '@/db/client';
import { projectRoot } from '@/db/root';
import * as schema from '@/db/schema';
import { seedDemo } from '@/db/seed';

/**
 * How an entry's rows are laid out on disk: each B-tree a new entry touches is a page written to
 * the WAL, flushed, and shipped to the shore mirror, so the layout is part of what the write
 * path costs.
 */

const migrations = path.join(projectRoot, 'db', 'migrations');
type Journal = { entries: { idx: number; tag: string }[] };
const journal = JSON.parse(readFileSync(path.join(migrations, 'meta', '_journal.json'), 'utf8')) as Journal;
const TAGS_WITHOUT_ROWID = '0013_observation-tags-without-rowid';

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'bathynote-storage-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const tableSql = (db: Db, name: string) =>
  (db.$client.prepare(`select sql from sqlite_schema where type = 'table' and name = ?`).get(name) as { sql: string }).sql;
const indexNames = (db: Db) =>
  (db.$client.prepare(`select name from sqlite_schema where type = 'index'`).all() as { name: string }[]).map((r) => r.name);
const plan = (db: Db, query: string, ...params: unknown[]) =>
  (db.$client.prepare(`explain query plan ${query}`).all(...params) as { detail: string }[]).map((r) => r.detail).join('\n');
const tagRows = (db: Db) => db.$client.prepare('select observation_id, tag_id from observation_tags order by 1, 2').all();

describe('a new database', () => {
  let db: Db;
  beforeAll(() => {
    db = openDatabase(path.join(dir, 'fresh.db'));
    migrateDatabase(db);
  });
  afterAll(() => db.$client.close());

  it('keeps entry tags in their key’s own B-tree, with the index by tag beside it', () => {
    expect(tableSql(db, 'observation_tags')).toMatch(/\)\s*WITHOUT ROWID$/);
    expect(db.$client.pragma(`table_list('observation_tags')`)).toEqual([expect.objectContaining({ wr: 1 })]);
    expect(indexNames(db)).toContain('observation_tag_tag_idx');
    expect(plan(db, 'select observation_id from observation_tags where tag_id = ?', 'x')).toMatch(
      /USING (COVERING )?INDEX observation_tag_tag_idx/,
    );
  });

  it('has no index on the author alone, and finds an author’s entries through the unique index that leads with the author', () => {
    expect(indexNames(db)).not.toContain('observation_author_idx');
    expect(indexNames(db)).toContain('observation_client_ref_unique');
    expect(plan(db, 'select id from observations where author_id = ?', 'x')).toMatch(
      /SEARCH observations USING (COVERING )?INDEX observation_client_ref_unique \(author_id=\?\)/,
    );
  });

  it('is described by the last migration’s snapshot exactly, so generating a migration finds nothing to do', async () => {
    const last = journal.entries.at(-1)!;
    const snapshot = JSON.parse(
      readFileSync(path.join(migrations, 'meta', `${String(last.idx).padStart(4, '0')}_snapshot.json`), 'utf8'),
    ) as Parameters<typeof generateSQLiteMigration>[0];
    const current = await generateSQLiteDrizzleJson(schema);
    expect(await generateSQLiteMigration(snapshot, current)).toEqual([]);
  });
});

describe('a database made before entry tags were stored without rowids', () => {
  let db: Db;
  let before: unknown[];
  beforeAll(async () => {
    // The migrations as they stood before that one: a copy of the folder with the journal cut short.
    const older = path.join(dir, 'older-migrations');
    cpSync(migrations, older, { recursive: true });
    const at = journal.entries.findIndex((e) => e.tag === TAGS_WITHOUT_ROWID);
    expect(at).toBeGreaterThan(0);
    writeFileSync(path.join(older, 'meta', '_journal.json'), JSON.stringify({ ...journal, entries: journal.entries.slice(0, at) }));
    db = openDatabase(path.join(dir, 'older.db'));
    migrate(db, { migrationsFolder: older });
    await seedDemo(db, { watchPlan: false });
    expect(tableSql(db, 'observation_tags')).not.toMatch(/WITHOUT ROWID/);
    expect(indexNames(db)).toContain('observation_author_idx');
    before = tagRows(db);
    migrateDatabase(db);
  });
  afterAll(() => db.$client.close());

  it('keeps every tag of every entry through the migration', () => {
    expect(before.length).toBeGreaterThan(50);
    expect(tagRows(db)).toEqual(before);
    expect(tableSql(db, 'observation_tags')).toMatch(/WITHOUT ROWID$/);
    expect(indexNames(db)).not.toContain('observation_author_idx');
    expect(indexNames(db)).toContain('observation_tag_tag_idx');
    expect(db.$client.pragma('foreign_key_check')).toEqual([]);
  });

  it('still drops an entry’s tags with the entry, and refuses to delete a tag in use', () => {
    expect(db.$client.pragma('foreign_key_list(observation_tags)')).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ table: 'observations', from: 'observation_id', on_delete: 'CASCADE' }),
        expect.objectContaining({ table: 'tags', from: 'tag_id', on_delete: 'RESTRICT' }),
      ]),
    );
    const { tag_id: tagId } = db.$client.prepare('select tag_id from observation_tags limit 1').get() as { tag_id: string };
    expect(() => db.$client.prepare('delete from tags where id = ?').run(tagId)).toThrow(/FOREIGN KEY constraint failed/);

    const { id } = db.$client
      .prepare(
        `select ot.observation_id as id from observation_tags ot
          where not exists (select 1 from photos p where p.observation_id = ot.observation_id)
            and not exists (select 1 from photo_measurements m where m.observation_id = ot.observation_id)
          limit 1`,
      )
      .get() as { id: string };
    const count = () =>
      (db.$client.prepare('select count(*) as n from observation_tags where observation_id = ?').get(id) as { n: number }).n;
    expect(count()).toBeGreaterThan(0);
    db.$client.prepare('delete from observations where id = ?').run(id);
    expect(count()).toBe(0);
  });
});
