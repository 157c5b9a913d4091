import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { request as httpRequest, type Server } from 'node:http';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';

import helmet from 'helmet';
import express from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { precompressWebBuild } from '../../scripts/web-build';
import { webExport } from '../../server/services/web';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

type Raw = { status: number; headers: Record<string, string | string[] | undefined>; body: Buffer };

/** A plain HTTP GET that leaves the body as it came over the wire (no decoding). */
function get(url: string, headers: Record<string, string> = {}): Promise<Raw> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(url, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      res.on('error', reject);
    });
    req.on('error', reject);
    req.end();
  });
}

function decoded(res: Raw): string {
  const encoding = res.headers['content-encoding'];
  if (encoding === 'br') return brotliDecompressSync(res.body).toString('utf8');
  if (encoding === 'gzip') return gunzipSync(res.body).toString('utf8');
  expect(encoding).toBeUndefined();
  return res.body.toString('utf8');
}

function varies(res: Raw): boolean {
  return String(res.headers.vary ?? '')
    .toLowerCase()
    .includes('accept-encoding');
}

let t: TestServer;
let ids: Fixtures;
let cookie: string;

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '200', API_RATE_LIMIT: '1000' } });
  ids = await buildFixtures(t);
  cookie = await t.sessionCookie(emails.lead);
});
afterAll(() => t.close());

const logUrl = () => `${t.url}/api/dives/${ids.dive}/observations`;

async function postEntry(title: string): Promise<void> {
  const res = await (await t.signIn(emails.biologist)).post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title });
  expect(res.status).toBe(201);
}

describe('compressed API answers', () => {
  it('sends the dive log as gzip or brotli when asked, and as it is otherwise', async () => {
    const plain = await get(logUrl(), { cookie });
    expect(plain.status).toBe(200);
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(varies(plain)).toBe(true);
    const json = plain.body.toString('utf8');
    // Below 1 KB an answer goes as it is; the fixture's log is well above that.
    expect(plain.body.length).toBeGreaterThan(1024);

    const gzip = await get(logUrl(), { cookie, 'accept-encoding': 'gzip' });
    expect(gzip.headers['content-encoding']).toBe('gzip');
    expect(varies(gzip)).toBe(true);
    expect(gzip.body.length).toBeLessThan(plain.body.length / 2);
    expect(decoded(gzip)).toBe(json);

    const br = await get(logUrl(), { cookie, 'accept-encoding': 'gzip, deflate, br' });
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.body.length).toBeLessThan(plain.body.length / 2);
    expect(JSON.parse(decoded(br))).toEqual(JSON.parse(json));
  });

  it('keeps the live stream unencoded, each event arriving at once', async () => {
    const chunks: string[] = [];
    let headers: Record<string, string | string[] | undefined> = {};
    const req = httpRequest(`${t.url}/api/dives/${ids.dive}/stream`, {
      headers: { cookie, accept: 'text/event-stream', 'accept-encoding': 'gzip, deflate, br' },
    });
    const opened = new Promise<void>((resolve, reject) => {
      req.on('response', (res) => {
        headers = res.headers;
        res.setEncoding('utf8');
        res.on('data', (c: string) => chunks.push(c));
        resolve();
      });
      req.on('error', reject);
    });
    req.end();
    try {
      await opened;
      expect(headers['content-type']).toMatch(/^text\/event-stream/);
      expect(headers['content-encoding']).toBeUndefined();
      await expect.poll(() => chunks.join(''), { timeout: 2000 }).toContain('event: ready');
      const posted = Date.now();
      await postEntry('Live over a compressing server');
      await expect.poll(() => chunks.join(''), { timeout: 1000, interval: 20 }).toContain('Live over a compressing server');
      expect(Date.now() - posted).toBeLessThan(1000);
    } finally {
      req.destroy();
    }
  });

  it('leaves an already compressed download (a zip archive) as it is', async () => {
    const zip = await get(`${t.url}/api/campaigns/${ids.campaign}/export/darwin-core.zip`, { cookie, 'accept-encoding': 'gzip, br' });
    expect(zip.status).toBe(200);
    expect(zip.headers['content-type']).toMatch(/zip/);
    expect(zip.headers['content-encoding']).toBeUndefined();
    // A zip file starts with "PK".
    expect(zip.body.subarray(0, 2).toString('latin1')).toBe('PK');
  });
});

describe('revalidated API reads', () => {
  const reads: { name: string; url: () => string; change: () => Promise<void> }[] = [
    { name: 'a dive log page', url: () => `${logUrl()}?limit=20`, change: () => postEntry('A new entry for the log page') },
    {
      name: 'a campaign',
      url: () => `${t.url}/api/campaigns/${ids.campaign}`,
      change: async () => {
        const res = await (
          await t.signIn(emails.lead)
        )
          .patch(`/api/campaigns/${ids.campaign}`)
          .send({ siteName: 'The wreck, north mound' });
        expect(res.status, JSON.stringify(res.body)).toBe(200);
      },
    },
    {
      name: 'a dive',
      url: () => `${t.url}/api/dives/${ids.dive}`,
      change: async () => {
        const res = await (
          await t.signIn(emails.pilot)
        )
          .post(`/api/dives/${ids.dive}/phases`)
          .send({ phase: 'on-deck', at: '2026-05-13T23:30:00.000Z' });
        expect(res.status, JSON.stringify(res.body)).toBe(200);
      },
    },
    { name: 'a dive summary', url: () => `${t.url}/api/dives/${ids.dive}/summary`, change: () => postEntry('A new entry for the summary') },
  ];

  for (const read of reads) {
    it(`answers 304 without a body for ${read.name} that has not changed, 200 once it has`, async () => {
      for (const encoding of ['identity', 'gzip, br']) {
        const first = await get(read.url(), { cookie, 'accept-encoding': encoding });
        expect(first.status).toBe(200);
        const etag = first.headers.etag;
        expect(typeof etag).toBe('string');

        const again = await get(read.url(), { cookie, 'accept-encoding': encoding, 'if-none-match': String(etag) });
        expect(again.status).toBe(304);
        expect(again.body.length).toBe(0);
        expect(again.headers.etag).toBe(etag);
      }

      const before = await get(read.url(), { cookie });
      await read.change();
      const after = await get(read.url(), { cookie, 'if-none-match': String(before.headers.etag) });
      expect(after.status).toBe(200);
      expect(after.headers.etag).not.toBe(before.headers.etag);
      expect(after.body.toString('utf8')).not.toBe(before.body.toString('utf8'));
    });
  }
});

describe('the web export', () => {
  let dir: string;
  let server: Server;
  let url: string;
  const bundlePath = '/_expo/static/js/web/entry-0123456789abcdef0123456789abcdef.js';
  const bundle = `/* app */\n${Array.from({ length: 400 }, (_, i) => `export const value${i} = ${i} * 2;`).join('\n')}\n`;
  const index = `<!DOCTYPE html><html><head><script>window.__bn=1</script></head><body>${'<div></div>'.repeat(200)}<script src="${bundlePath}" defer></script></body></html>`;

  beforeAll(async () => {
    dir = mkdtempSync(path.join(tmpdir(), 'bathynote-web-'));
    mkdirSync(path.join(dir, '_expo/static/js/web'), { recursive: true });
    writeFileSync(path.join(dir, bundlePath), bundle);
    writeFileSync(path.join(dir, 'index.html'), index);
    precompressWebBuild(dir);
    const app = express();
    app.use(helmet(), ...webExport(dir).handlers);
    server = app.listen(0, '127.0.0.1');
    await new Promise<void>((resolve) => server.once('listening', resolve));
    const address = server.address();
    url = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
  });
  afterAll(async () => {
    await new Promise<void>((resolve) => server.close(() => resolve()));
    rmSync(dir, { recursive: true, force: true });
  });

  it('writes brotli and gzip copies beside each compressible file at build time', () => {
    expect(brotliDecompressSync(readFileSync(path.join(dir, `${bundlePath}.br`))).toString('utf8')).toBe(bundle);
    expect(gunzipSync(readFileSync(path.join(dir, `${bundlePath}.gz`))).toString('utf8')).toBe(bundle);
  });

  it('sends a hashed bundle precompressed as the browser accepts, cached for a year', async () => {
    for (const [accept, expected] of [
      ['gzip, deflate, br', 'br'],
      ['gzip', 'gzip'],
      ['', undefined],
    ] as const) {
      const res = await get(`${url}${bundlePath}`, accept ? { 'accept-encoding': accept } : {});
      expect(res.status).toBe(200);
      expect(res.headers['content-encoding']).toBe(expected);
      expect(res.headers['content-type']).toMatch(/javascript/);
      expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
      expect(varies(res)).toBe(true);
      expect(decoded(res)).toBe(bundle);
      // Only what a script acts on: no page policies.
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      for (const name of ['content-security-policy', 'x-frame-options', 'referrer-policy']) expect(res.headers[name], name).toBeUndefined();
    }
  });

  it('sends index.html compressed, revalidated with an ETag', async () => {
    for (const accept of ['br', 'gzip', 'identity']) {
      const res = await get(`${url}/dives/some-deep-link`, { 'accept-encoding': accept });
      expect(res.status).toBe(200);
      expect(res.headers['cache-control']).toBe('no-cache');
      expect(res.headers['content-security-policy']).toBeDefined();
      expect(res.headers['content-encoding']).toBe(accept === 'identity' ? undefined : accept);
      expect(decoded(res)).toBe(index);
      const again = await get(`${url}/`, { 'accept-encoding': accept, 'if-none-match': String(res.headers.etag) });
      expect(again.status).toBe(304);
      expect(again.body.length).toBe(0);
    }
  });
});
