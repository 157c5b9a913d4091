/**
 * The live-load benchmark's baseline: a bare Express endpoint on the same stack as the server
 * (the same HTTP server settings and JSON parsing, better-sqlite3 opened with the same pragmas, synchronous=FULL) that
 * inserts one row per request and answers 201. The same schedule driven at it in the same run
 * says how much of a figure is the machine and how much is the notebook.
 *
 * Usage: node --import tsx tests/bench/baseline-server.ts <port> <database file>
 */
import express from 'express';

import { openDatabase } from '../../db/client';
import { bornFor, createHttpServer } from '../../server/http-server';
import { serverTiming } from '../../server/middleware/timing';

const [port, file] = process.argv.slice(2);
const db = openDatabase(file!).$client;
db.exec('create table if not exists entries (id text primary key, title text not null, body text not null, created_at integer not null)');
const insert = db.prepare('insert into entries (id, title, body, created_at) values (?, ?, ?, ?)');

const app = express();
app.disable('x-powered-by');
app.use(serverTiming);
app.use(express.json({ limit: '256kb' }));
app.post('/entries', (req, res) => {
  const body = req.body as { title?: unknown };
  const id = crypto.randomUUID();
  insert.run(id, typeof body.title === 'string' ? body.title : '', JSON.stringify(req.body), Date.now());
  res.status(201).json({ id, ...(req.body as object) });
});
app.get('/health', (_req, res) => {
  res.json({ ok: true });
});
const server = createHttpServer(app);
// As the server under test does, so the two stay on the same stack.
bornFor(server, app);
server.listen(Number(port), '127.0.0.1', () => process.stdout.write('listening\n'));
