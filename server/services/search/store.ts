/**
 * The search index's own SQLite file, attached to the record's connection as `search`.
 *
 * It holds an FTS5 table over each live entry's title, tags, scientific name, find number and
 * note, keyed by the entry's rowid in `observations`, and a `scope` column of tokens naming the
 * entry's campaign and dive (`scopeToken`), so that a search limits itself to the caller's
 * campaigns inside FTS5 instead of looking every match up in the record. The record never depends on it: it can be
 * deleted at any time and is rebuilt at the next start, and backups carry only the record.
 *
 * It is kept current by TEMP triggers on the record's tables, created on this connection when the
 * server opens the index, so every create, edit, retire, restore, identification, find and tag
 * rename or merge updates it in that change's own transaction, whichever service made the change.
 * SQLite does not commit a transaction across two WAL files atomically, so the index also keeps a
 * high-water mark of the record's changes it holds (the last `observation_revisions` rowid and the
 * last tag change in `audit_log`); at start anything newer is indexed again, and an index that
 * holds more than the record (a commit the record lost) is rebuilt.
 */
import { existsSync, rmSync } from 'node:fs';

import type { Db } from '../../../db/client';

/** Raised when the layout below changes, so that an older index file is rebuilt. */
const FORMAT = 2;

/** Column order of the FTS table; bm25 weights and highlighting follow it. */
export const indexedFields = ['title', 'tags', 'scientificName', 'findNumber', 'note'] as const;
export type IndexedField = (typeof indexedFields)[number];

/** The file beside the database: `data/bathynote.db` → `data/bathynote.search.db`. */
export function indexFileFor(databasePath: string): string {
  if (databasePath === ':memory:' || databasePath === '') return ':memory:';
  return databasePath.endsWith('.db') ? `${databasePath.slice(0, -3)}.search.db` : `${databasePath}.search`;
}

/**
 * The one token for a campaign (`c`) or dive (`d`) in the scope column: the id's UTF-8 bytes in
 * hex, so that any id is one word to the tokenizer. `scopeSql` is the same in SQL.
 */
export const scopeToken = (kind: 'c' | 'd', id: string) => `${kind}${Buffer.from(id, 'utf8').toString('hex')}`;
const scopeSql = `'c' || lower(hex(o.campaign_id)) || ' d' || lower(hex(o.dive_id))`;

/** The indexed text of the entries `where` selects (over `o`), live entries only. */
const rowsOf = (where: string) => `
  select o.rowid, o.title,
    coalesce((select group_concat(t.name, ' ') from observation_tags ot join tags t on t.id = ot.tag_id
      where ot.observation_id = o.id), ''),
    coalesce((select i.scientific_name from identifications i where i.observation_id = o.id), ''),
    coalesce((select f.find_number from finds f where f.observation_id = o.id), ''),
    o.note, ${scopeSql}
  from observations o where (${where}) and o.retired = 0`;

const insertRows = (where: string) =>
  `insert into search_entries (rowid, title, tags, scientific_name, find_number, note, scope) ${rowsOf(where)};`;

/** Drops and re-adds the entries `where` selects: the statement list of a trigger. */
const reindex = (where: string) => `
  delete from search_entries where rowid in (select o.rowid from observations o where ${where});
  ${insertRows(where)}`;

const byId = (idExpr: string) => `o.id = ${idExpr}`;
const byTag = (tagExpr: string) => `o.id in (select ot.observation_id from observation_tags ot where ot.tag_id = ${tagExpr})`;

const tagChange = `new.action in ('tag.updated', 'tag.merged')`;

/**
 * The triggers. Temp triggers may write to an attached database; their unqualified table names
 * resolve to the index's own tables, which no other database has.
 */
const triggers: Record<string, string> = {
  // Named columns set to what they already held (an edit of other fields writes them all) leave the index alone.
  observation_changed: `after update of title, note, retired, dive_id, campaign_id on observations
    when old.title is not new.title or old.note is not new.note or old.retired is not new.retired
      or old.dive_id is not new.dive_id or old.campaign_id is not new.campaign_id
    begin ${reindex(byId('new.id'))} end`,
  observation_removed: `after delete on observations begin delete from search_entries where rowid = old.rowid; end`,
  // A tag put on an entry being created is indexed with the entry, at its first revision.
  tag_added: `after insert on observation_tags when exists (select 1 from observation_revisions r where r.observation_id = new.observation_id)
    begin ${reindex(byId('new.observation_id'))} end`,
  tag_taken: `after delete on observation_tags begin ${reindex(byId('old.observation_id'))} end`,
  tag_renamed: `after update of name on tags begin ${reindex(byTag('new.id'))} end`,
  identification_added: `after insert on identifications begin ${reindex(byId('new.observation_id'))} end`,
  identification_changed: `after update of scientific_name on identifications begin ${reindex(byId('new.observation_id'))} end`,
  identification_removed: `after delete on identifications begin ${reindex(byId('old.observation_id'))} end`,
  find_added: `after insert on finds begin ${reindex(byId('new.observation_id'))} end`,
  find_changed: `after update of find_number on finds begin ${reindex(byId('new.observation_id'))} end`,
  find_removed: `after delete on finds begin ${reindex(byId('old.observation_id'))} end`,
  // A new entry is indexed once, when its creation is recorded as its first revision: by then its
  // tags are on it, where indexing it as its row went in and again for each tag took a dozen
  // index writes. Every entry is created with that revision in the same transaction.
  revision_mark: `after insert on observation_revisions begin
    ${insertRows(`new.action = 'created' and ${byId('new.observation_id')}`)}
    update search_meta set value = new.rowid where key = 'revision';
    update search_meta set value = new.observation_id where key = 'revision_of';
  end`,
  tag_change_mark: `after insert on audit_log when ${tagChange} begin
    update search_meta set value = new.id where key = 'audit';
  end`,
};

export type IndexStart = { rebuilt: boolean; reason: string | null; caughtUp: number; ms: number };

type Meta = { format: number; revision: number; revision_of: string; audit: number };

function readMeta(db: Db): Partial<Meta> {
  const rows = db.$client.prepare('select key, value from search.search_meta').all() as { key: keyof Meta; value: never }[];
  return Object.fromEntries(rows.map((r) => [r.key, r.value]));
}

/** Where the record stands now: its last revision (and whose) and its last tag change. */
function recordMark(db: Db) {
  const rev = db.$client
    .prepare('select rowid as n, observation_id as id from main.observation_revisions order by rowid desc limit 1')
    .get() as { n: number; id: string } | undefined;
  const audit = db.$client
    .prepare(`select coalesce(max(id), 0) as n from main.audit_log where action in ('tag.updated', 'tag.merged')`)
    .get() as {
    n: number;
  };
  return { revision: rev?.n ?? 0, revisionOf: rev?.id ?? '', audit: audit.n };
}

function writeMark(db: Db, mark: ReturnType<typeof recordMark>) {
  const set = db.$client.prepare('insert or replace into search.search_meta (key, value) values (?, ?)');
  set.run('format', FORMAT);
  set.run('revision', mark.revision);
  set.run('revision_of', mark.revisionOf);
  set.run('audit', mark.audit);
}

function createTables(db: Db) {
  db.$client.exec(`
    drop table if exists search.search_terms;
    drop table if exists search.search_entries;
    drop table if exists search.search_meta;
    create virtual table search.search_entries using fts5(
      title, tags, scientific_name, find_number, note, scope,
      content = '', contentless_delete = 1,
      tokenize = 'unicode61 remove_diacritics 2'
    );
    create virtual table search.search_terms using fts5vocab('search_entries', 'col');
    create table search.search_meta (key text primary key, value) without rowid;
  `);
}

function attach(db: Db, file: string) {
  db.$client.prepare('attach database ? as search').run(file);
  if (file !== ':memory:') {
    db.$client.pragma('search.journal_mode = WAL');
    // The index is derived from the record and caught up at start, so it need not wait for the disk.
    db.$client.pragma('search.synchronous = NORMAL');
  }
  // A search reads the long word lists of common words; kept in memory (up to 64 MB), they are
  // not read from the file again on every query.
  db.$client.pragma('search.cache_size = -65536');
}

/** Why the index file cannot be caught up and must be built again, or null when it can. */
function rebuildReason(db: Db, existed: boolean): string | null {
  if (!existed) return 'no index file';
  const tables = db.$client.prepare(`select name from search.sqlite_master where name in ('search_entries', 'search_meta')`).all();
  if (tables.length < 2) return 'index file empty';
  const meta = readMeta(db);
  if (meta.format !== FORMAT) return 'index layout changed';
  const now = recordMark(db);
  if ((meta.revision ?? 0) > now.revision || (meta.audit ?? 0) > now.audit) return 'index holds changes the record does not';
  if (meta.revision) {
    // The revision the index last saw must still be the same one in the record (not a restored
    // backup or a renumbered table).
    const same = db.$client.prepare('select observation_id from main.observation_revisions where rowid = ?').pluck().get(meta.revision);
    if (same !== meta.revision_of) return 'record replaced';
  }
  return null;
}

/**
 * Attaches the index file (creating or rebuilding it as needed), catches it up with the record and
 * installs the triggers that keep it current. Runs once per connection, before anything is written.
 */
export function openIndexStore(db: Db, databasePath: string): IndexStart {
  const started = performance.now();
  const file = indexFileFor(databasePath);
  const existed = file !== ':memory:' && existsSync(file);
  let reason: string | null;
  try {
    attach(db, file);
    reason = rebuildReason(db, existed);
  } catch {
    // Not a database any more (a half-copied or damaged file): it is only derived data.
    const attached = (db.$client.pragma('database_list') as { name: string }[]).some((d) => d.name === 'search');
    if (attached) db.$client.exec('detach database search');
    for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true });
    attach(db, file);
    reason = 'index file unreadable';
  }
  let caughtUp = 0;
  db.$client.transaction(() => {
    const mark = recordMark(db);
    if (reason) {
      createTables(db);
      db.$client.exec(insertRows('1'));
    } else {
      caughtUp = catchUp(db, readMeta(db));
    }
    writeMark(db, mark);
  })();
  for (const [name, body] of Object.entries(triggers)) {
    db.$client.exec(`drop trigger if exists temp.search_${name}; create temp trigger search_${name} ${body}`);
  }
  return { rebuilt: reason !== null, reason, caughtUp, ms: performance.now() - started };
}

/** Indexes again every entry the record changed after the index's mark; answers how many. */
function catchUp(db: Db, meta: Partial<Meta>): number {
  const changed = `o.id in (select observation_id from main.observation_revisions where rowid > ${Number(meta.revision ?? 0)})
    or o.id in (select ot.observation_id from main.observation_tags ot where ot.tag_id in (
      select a.target from main.audit_log a where a.id > ${Number(meta.audit ?? 0)} and a.action in ('tag.updated', 'tag.merged')
      union select json_extract(a.detail, '$.intoId') from main.audit_log a where a.id > ${Number(meta.audit ?? 0)} and a.action = 'tag.merged'))`;
  const n = db.$client.prepare(`select count(*) from observations o where ${changed}`).pluck().get() as number;
  if (n > 0) db.$client.exec(reindex(`(${changed})`));
  return n;
}

/** Rowids of entries whose text changed after a revision mark, for the in-memory vocabulary. */
export function changedSince(db: Db, revision: number): { rowids: number[]; revision: number } {
  const rows = db.$client
    .prepare(
      'select r.rowid as r, o.rowid as o from main.observation_revisions r join main.observations o on o.id = r.observation_id where r.rowid > ? order by r.rowid',
    )
    .all(revision) as { r: number; o: number }[];
  return { rowids: [...new Set(rows.map((x) => x.o))], revision: rows.length > 0 ? rows[rows.length - 1]!.r : revision };
}

/** The index's current revision mark (cheap: one row of a tiny table). */
export function indexMark(db: Db): { revision: number; audit: number } {
  const m = readMeta(db);
  return { revision: Number(m.revision ?? 0), audit: Number(m.audit ?? 0) };
}
