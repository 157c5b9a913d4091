import { readFileSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import path from 'node:path';

import { count, eq } from 'drizzle-orm';
import exifr from 'exifr';
import sharp from 'sharp';
import type { Response } from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { campaigns, observations, photos } from '@/db/schema';
import { galleryPageSchema, observationDetailSchema, observationSchema, photoUploadResultSchema, type Photo } from '@/lib/schemas';
import type { LiveEvent } from '@/server/services/live';
import { PHOTO_SLOTS, workQueue } from '@/server/services/photo-processing';
import { listFiles } from '@/server/services/photo-storage';
import {
  bombPng,
  CAMERA_MARK,
  gifWithScript,
  heic,
  htmlAsJpeg,
  jpegWithExif,
  jpegWithScript,
  png,
  svg,
  tinyJpeg,
  webp,
} from '../fixtures/photos/make';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { openSse } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;
let uploadsDir: string;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
  uploadsDir = path.join(t.dir, 'uploads');
});
afterAll(() => t.close());

type Agent = Awaited<ReturnType<TestServer['signIn']>>;

async function newEntry(email: string = emails.biologist, body: Record<string, unknown> = {}): Promise<string> {
  const agent = await t.signIn(email);
  const res = await agent
    .post(`/api/dives/${ids.dive}/observations`)
    .send({ kind: 'biology', title: 'Sponge field on the stern', tags: ['sponge'], ...body });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

function upload(agent: Agent, entryId: string, files: { data: Buffer; name: string; type?: string }[]) {
  let req = agent.post(`/api/observations/${entryId}/photos`);
  for (const f of files) req = req.attach('photo', f.data, { filename: f.name, contentType: f.type ?? 'image/jpeg' });
  return req;
}

const photoRows = () => t.ctx.db.select({ n: count() }).from(photos).get()!.n;
const storedFiles = () => listFiles(uploadsDir);
const stored = (key: string) => readFileSync(path.join(uploadsDir, key));
const rowOf = (id: string) => t.ctx.db.select().from(photos).where(eq(photos.id, id)).get()!;

/** Reads a response body as bytes whatever its type. */
function binary(res: Response, done: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

describe('accepted types', () => {
  const cases = [
    {
      name: 'frame-grab.jpg',
      type: 'image/jpeg',
      make: () => jpegWithExif({ dateTimeOriginal: '2026:05:13 21:14:07' }),
      mime: 'image/jpeg',
    },
    { name: 'frame-grab.png', type: 'image/png', make: () => png(), mime: 'image/png' },
    { name: 'still.webp', type: 'image/webp', make: () => webp(), mime: 'image/webp' },
  ];

  it.each(cases)(
    'takes $mime, keeps it re-encoded in three sizes and serves each with its real type',
    async ({ name, type, make, mime }) => {
      const agent = await t.signIn(emails.biologist);
      const entry = await newEntry();
      const data = await make();
      const res = await upload(agent, entry, [{ data, name, type }]);
      expect(res.status).toBe(201);
      const body = photoUploadResultSchema.parse(res.body);
      expect(body.photos).toHaveLength(1);
      const photo = body.photos[0]!;
      expect(photo.id).toEqual(expect.any(String));
      expect(photo.mime).toBe(mime);
      expect(res.headers.location).toBe(`/api/photos/${photo.id}`);

      const row = rowOf(photo.id);
      // Generated names only: nothing of the uploaded name reaches the folder.
      for (const key of [row.originalKey, row.displayKey, row.thumbKey]) {
        expect(key).not.toContain(name.split('.')[0]);
        expect(key).toMatch(/^[a-z0-9]{2}\/[a-f0-9]{32}-[a-z]+\.(jpg|png|webp)$/);
      }
      const original = stored(row.originalKey);
      // The fixture's camera tag is gone: the file was re-encoded, not copied.
      expect(data.includes(CAMERA_MARK)).toBe(true);
      expect(original.includes(CAMERA_MARK)).toBe(false);
      expect((await sharp(original).metadata()).format).toBe(mime.split('/')[1]);
      const thumb = await sharp(stored(row.thumbKey)).metadata();
      expect(thumb.format).toBe('webp');
      expect(Math.max(thumb.width, thumb.height)).toBeLessThanOrEqual(320);
      const display = await sharp(stored(row.displayKey)).metadata();
      expect(display.format).toBe('webp');
      expect(Math.max(display.width, display.height)).toBeLessThanOrEqual(1600);

      for (const [size, expected] of [
        ['thumb', 'image/webp'],
        ['display', 'image/webp'],
        ['original', mime],
      ] as const) {
        const served = await agent.get(`/api/photos/${photo.id}?size=${size}`).buffer(true).parse(binary);
        expect(served.status, size).toBe(200);
        expect(served.headers['content-type'], size).toBe(expected);
        expect(served.headers['x-content-type-options']).toBe('nosniff');
        expect(served.headers['content-security-policy']).toBe("default-src 'none'; sandbox");
        expect(served.headers['content-disposition']).toMatch(
          new RegExp(`^inline; filename="bathynote-photo-${photo.id}-${size}\\.(jpg|png|webp)"$`),
        );
        expect(served.headers['cache-control']).toMatch(/^private/);
        expect(served.headers.etag).toMatch(/^"[^"]+"$/);
        expect((served.body as Buffer).length).toBeGreaterThan(0);
        const again = await agent.get(`/api/photos/${photo.id}?size=${size}`).set('If-None-Match', served.headers.etag as string);
        expect(again.status, size).toBe(304);
      }
      const bare = await agent.get(`/api/photos/${photo.id}`);
      expect(bare.headers['content-type']).toBe(mime);
    },
  );

  it('applies the camera orientation to the stored pixels', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = await jpegWithExif({ orientation: 6 }, { width: 640, height: 480 });
    const res = await upload(agent, entry, [{ data, name: 'turned.jpg' }]);
    expect(res.status).toBe(201);
    const photo = res.body.photos[0] as Photo;
    expect([photo.width, photo.height]).toEqual([480, 640]);
    const meta = await sharp(stored(rowOf(photo.id).originalKey)).metadata();
    expect([meta.width, meta.height]).toEqual([480, 640]);
    expect(meta.orientation ?? 1).toBe(1);
  });

  it('refuses a size it does not know with a field issue', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await upload(agent, entry, [{ data: await tinyJpeg('#102030'), name: 'a.jpg' }]);
    const bad = await agent.get(`/api/photos/${res.body.photos[0].id}?size=huge`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues).toContainEqual(expect.objectContaining({ path: 'size' }));
  });
});

describe('refusals, decided by content', () => {
  const refusals = [
    { what: 'an SVG', data: () => svg(), name: 'diagram.svg', type: 'image/svg+xml' },
    { what: 'HTML dressed as a JPEG', data: () => htmlAsJpeg(), name: 'frame.jpg', type: 'image/jpeg' },
    { what: 'a GIF with a script after it', data: () => gifWithScript(), name: 'tiny.gif', type: 'image/gif' },
    { what: 'plain text named .png', data: () => Buffer.from('just some words'), name: 'notes.png', type: 'image/png' },
  ];

  it.each(refusals)('refuses $what with 415, storing nothing', async ({ data, name, type }) => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const [rowsBefore, filesBefore] = [photoRows(), await storedFiles()];
    const res = await upload(agent, entry, [{ data: data(), name, type }]);
    expect(res.status).toBe(415);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body.error.code).toBe('unsupported_type');
    expect(photoRows()).toBe(rowsBefore);
    expect(await storedFiles()).toEqual(filesBefore);
  });

  it('refuses an HEIC the server cannot decode with 415 and says how to send JPEG instead', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await upload(agent, entry, [{ data: heic(), name: 'IMG_0001.HEIC', type: 'image/heic' }]);
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/JPEG/);
  });

  it('refuses the whole request when one of its files is refused', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const [rowsBefore, filesBefore] = [photoRows(), await storedFiles()];
    const res = await upload(agent, entry, [
      { data: await tinyJpeg('#203040'), name: 'good.jpg' },
      { data: svg(), name: 'bad.svg', type: 'image/svg+xml' },
    ]);
    expect(res.status).toBe(415);
    expect(photoRows()).toBe(rowsBefore);
    expect(await storedFiles()).toEqual(filesBefore);
  });

  it('keeps a JPEG with a script appended, re-encoded without it', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = await jpegWithScript();
    expect(data.includes('<script')).toBe(true);
    const res = await upload(agent, entry, [{ data, name: 'grab.jpg' }]);
    expect(res.status).toBe(201);
    const row = rowOf(res.body.photos[0].id);
    for (const key of [row.originalKey, row.displayKey, row.thumbKey]) expect(stored(key).includes('<script')).toBe(false);
    const served = await agent.get(`/api/photos/${row.id}?size=original`).buffer(true).parse(binary);
    expect((served.body as Buffer).includes('<script')).toBe(false);
  });

  it('refuses a file over 25 MB with 413 in the error shape', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const big = Buffer.concat([await tinyJpeg(), Buffer.alloc(25 * 1024 * 1024)]);
    const res = await upload(agent, entry, [{ data: big, name: 'huge.jpg' }]);
    expect(res.status).toBe(413);
    expect(res.body.error).toEqual({ code: 'too_large', message: expect.stringMatching(/25 MB/) });
  });

  it('refuses more than ten files in one request with 413', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const rowsBefore = photoRows();
    const files = await Promise.all(Array.from({ length: 11 }, (_, i) => tinyJpeg(`#${(i * 20 + 16).toString(16)}4060`)));
    const res = await upload(
      agent,
      entry,
      files.map((data, i) => ({ data, name: `grab-${i}.jpg` })),
    );
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_many_files');
    expect(photoRows()).toBe(rowsBefore);
  });

  it('refuses a decompression bomb quickly with 413, before decoding it', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = bombPng();
    expect(data.length).toBeLessThan(5000);
    const [rowsBefore, filesBefore] = [photoRows(), await storedFiles()];
    const started = Date.now();
    const res = await upload(agent, entry, [{ data, name: 'bomb.png', type: 'image/png' }]);
    expect(Date.now() - started).toBeLessThan(2000);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_many_pixels');
    expect(photoRows()).toBe(rowsBefore);
    expect(await storedFiles()).toEqual(filesBefore);
  });

  it('answers a wrong field name and a non-multipart body with 400 in the error shape', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const wrong = await agent.post(`/api/observations/${entry}/photos`).attach('image', await tinyJpeg(), 'a.jpg');
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.code).toBe('validation_failed');
    const json = await agent.post(`/api/observations/${entry}/photos`).send({ photo: 'not a file' });
    expect(json.status).toBe(400);
    expect(json.body.error.issues).toContainEqual(expect.objectContaining({ path: 'photo' }));
    const none = await agent.post(`/api/observations/${entry}/photos`).field('caption', 'no file');
    expect(none.status).toBe(400);
  });
});

describe('what is read from the file', () => {
  it('takes the capture time from EXIF as UTC when the camera gave no offset', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = await jpegWithExif({ dateTimeOriginal: '2026:05:13 21:14:07', subSec: '25' });
    const res = await upload(agent, entry, [{ data, name: 'grab.jpg' }]);
    expect(res.body.photos[0].capturedAt).toBe('2026-05-13T21:14:07.250Z');
  });

  it('uses the EXIF offset when the camera wrote one', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = await jpegWithExif({ dateTimeOriginal: '2026:05:13 23:14:07', offset: '+02:00' });
    const res = await upload(agent, entry, [{ data, name: 'grab.jpg' }]);
    expect(res.body.photos[0].capturedAt).toBe('2026-05-13T21:14:07.000Z');
  });

  it('gives no capture time for a frame grab without EXIF', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await upload(agent, entry, [{ data: await png(320, 200), name: 'grab.png', type: 'image/png' }]);
    expect(res.body.photos[0].capturedAt).toBeNull();
  });

  it('drops GPS from the stored file unless the campaign keeps photo positions', async () => {
    const agent = await t.signIn(emails.biologist);
    const data = await jpegWithExif({ dateTimeOriginal: '2026:05:13 21:14:07', gps: true });
    // The fixture itself carries the position, so a pass below is the server's doing.
    expect(await exifr.gps(data)).toEqual({ latitude: expect.closeTo(36.145, 5), longitude: expect.closeTo(-7.432, 5) });

    const dropped = await upload(agent, await newEntry(), [{ data, name: 'grab.jpg' }]);
    expect(dropped.status).toBe(201);
    expect(dropped.body.photos[0]).toMatchObject({ lat: null, lon: null, capturedAt: '2026-05-13T21:14:07.000Z' });
    const droppedRow = rowOf(dropped.body.photos[0].id);
    const droppedFile = stored(droppedRow.originalKey);
    expect(await exifr.gps(droppedFile)).toBeUndefined();
    const kept = (await exifr.parse(droppedFile)) as { DateTimeOriginal?: Date; Make?: string } | undefined;
    expect(kept?.DateTimeOriginal).toBeDefined();
    expect(kept?.Make).toBeUndefined();
    for (const key of [droppedRow.displayKey, droppedRow.thumbKey]) expect((await sharp(stored(key)).metadata()).exif).toBeUndefined();

    t.ctx.db.update(campaigns).set({ keepPhotoPositions: true }).where(eq(campaigns.id, ids.campaign)).run();
    try {
      const withPosition = await upload(agent, await newEntry(), [{ data, name: 'grab.jpg' }]);
      expect(withPosition.status).toBe(201);
      expect(withPosition.body.photos[0].lat).toBeCloseTo(36.145, 5);
      expect(withPosition.body.photos[0].lon).toBeCloseTo(-7.432, 5);
      const file = stored(rowOf(withPosition.body.photos[0].id).originalKey);
      expect(await exifr.gps(file)).toEqual({ latitude: expect.closeTo(36.145, 5), longitude: expect.closeTo(-7.432, 5) });
    } finally {
      t.ctx.db.update(campaigns).set({ keepPhotoPositions: false }).where(eq(campaigns.id, ids.campaign)).run();
    }
  });
});

describe('the same file twice', () => {
  it('answers the photo already on the entry instead of storing it again', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const data = await tinyJpeg('#405060');
    const first = await upload(agent, entry, [{ data, name: 'a.jpg' }]);
    expect(first.status).toBe(201);
    const filesAfterFirst = await storedFiles();
    const second = await upload(agent, entry, [{ data, name: 'a-again.jpg' }]);
    expect(second.status).toBe(200);
    expect(second.body.photos[0].id).toBe(first.body.photos[0].id);
    expect(second.body.duplicates).toEqual([first.body.photos[0].id]);
    expect(await storedFiles()).toEqual(filesAfterFirst);
    expect(t.ctx.db.select({ n: count() }).from(photos).where(eq(photos.observationId, entry)).get()!.n).toBe(1);
  });

  it('stores the same file on another entry', async () => {
    const agent = await t.signIn(emails.biologist);
    const data = await tinyJpeg('#506070');
    const a = await upload(agent, await newEntry(), [{ data, name: 'a.jpg' }]);
    const b = await upload(agent, await newEntry(), [{ data, name: 'a.jpg' }]);
    expect(b.status).toBe(201);
    expect(b.body.photos[0].id).not.toBe(a.body.photos[0].id);
  });
});

describe('who may upload and see photos', () => {
  let entry: string;
  let photoId: string;
  beforeAll(async () => {
    entry = await newEntry();
    const res = await upload(await t.signIn(emails.biologist), entry, [{ data: await tinyJpeg('#607080'), name: 'a.jpg' }]);
    photoId = res.body.photos[0].id;
  });

  it('asks anonymous callers to sign in', async () => {
    const anon = t.anonymous();
    expect((await upload(anon, entry, [{ data: await tinyJpeg(), name: 'a.jpg' }])).status).toBe(401);
    expect((await anon.get(`/api/photos/${photoId}?size=thumb`)).status).toBe(401);
    expect((await anon.get(`/api/dives/${ids.dive}/photos`)).status).toBe(401);
  });

  it('answers 404 to someone outside the campaign, on upload, on the file and on the gallery', async () => {
    const outsider = await t.signIn(emails.outsider);
    const before = photoRows();
    const res = await upload(outsider, entry, [{ data: await tinyJpeg('#708090'), name: 'a.jpg' }]);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
    expect(photoRows()).toBe(before);
    for (const size of ['thumb', 'display', 'original']) {
      const file = await outsider.get(`/api/photos/${photoId}?size=${size}`);
      expect(file.status).toBe(404);
      expect(file.headers['content-type']).toMatch(/json/);
    }
    expect((await outsider.get(`/api/dives/${ids.dive}/photos`)).status).toBe(404);
    expect((await outsider.patch(`/api/photos/${photoId}`).send({ caption: 'mine' })).status).toBe(404);
    expect((await outsider.delete(`/api/photos/${photoId}`)).status).toBe(404);
  });

  it('answers 403 with a reason to another scientist of the campaign', async () => {
    const other = await t.signIn(emails.archaeologist);
    const res = await upload(other, entry, [{ data: await tinyJpeg('#8090a0'), name: 'a.jpg' }]);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/author/);
    expect((await other.patch(`/api/photos/${photoId}`).send({ caption: 'not mine' })).status).toBe(403);
    expect((await other.delete(`/api/photos/${photoId}`)).status).toBe(403);
    expect(rowOf(photoId).retired).toBe(false);
  });

  it('lets the lead add photos to anyone’s entry, and every member see them', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await upload(lead, entry, [{ data: await tinyJpeg('#90a0b0'), name: 'lead.jpg' }]);
    expect(res.status).toBe(201);
    for (const email of [emails.guest, emails.pilot, emails.archaeologist]) {
      const agent = await t.signIn(email);
      expect((await agent.get(`/api/photos/${photoId}?size=thumb`)).status, email).toBe(200);
    }
  });

  it('lets a guest add photos to an entry of their own', async () => {
    const guest = await t.signIn(emails.guest);
    const own = await newEntry(emails.guest, { title: 'Fish seen from ashore' });
    expect((await upload(guest, own, [{ data: await tinyJpeg('#a0b0c0'), name: 'g.jpg' }])).status).toBe(201);
  });

  it('answers 404 for an entry or a photo that does not exist', async () => {
    const agent = await t.signIn(emails.biologist);
    expect((await upload(agent, 'no-such-entry', [{ data: await tinyJpeg(), name: 'a.jpg' }])).status).toBe(404);
    expect((await agent.get('/api/photos/no-such-photo')).status).toBe(404);
  });
});

describe('an upload cut off half way', () => {
  async function sessionCookie(email: string): Promise<string> {
    const res = await fetch(`${t.url}/api/auth/sign-in/email`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: t.url },
      body: JSON.stringify({ email, password: 'bathynote-demo' }),
    });
    expect(res.status).toBe(200);
    return res.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
  }

  it('leaves no file in the uploads folder and no row', async () => {
    const entry = await newEntry();
    const cookie = await sessionCookie(emails.biologist);
    const image = await jpegWithExif({}, { width: 2000, height: 1500 });
    const boundary = '----bathynote-test-boundary';
    const head = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="photo"; filename="cut.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`,
    );
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const whole = Buffer.concat([head, image, tail]);
    const [rowsBefore, filesBefore] = [photoRows(), await storedFiles()];

    await new Promise<void>((resolve) => {
      const url = new URL(`/api/observations/${entry}/photos`, t.url);
      const req = httpRequest(url, {
        method: 'POST',
        headers: {
          cookie,
          'content-type': `multipart/form-data; boundary=${boundary}`,
          'content-length': String(whole.length),
        },
      });
      req.on('error', () => resolve());
      req.on('response', (res) => {
        res.resume();
        resolve();
      });
      req.write(whole.subarray(0, Math.floor(whole.length / 2)), () => {
        setTimeout(() => {
          req.destroy();
          resolve();
        }, 150);
      });
    });
    // Give the server time to notice the cut and to finish anything it might have begun.
    await new Promise((r) => setTimeout(r, 500));
    expect(photoRows()).toBe(rowsBefore);
    expect(await storedFiles()).toEqual(filesBefore);
    expect(t.ctx.db.select({ n: count() }).from(photos).where(eq(photos.observationId, entry)).get()!.n).toBe(0);

    // The same upload sent whole goes through, so the cut is what kept it out.
    const agent = await t.signIn(emails.biologist);
    expect((await upload(agent, entry, [{ data: image, name: 'cut.jpg' }])).status).toBe(201);
  });
});

describe('bounded image work', () => {
  /** Streams a multipart body of `total` bytes in 1 MB chunks, as fast as the server takes them, until it answers. */
  async function streamUpload(entry: string, total: number, headers: Record<string, string> = {}) {
    const cookie = await t.sessionCookie(emails.biologist);
    const boundary = '----bathynote-stream-boundary';
    const head = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="photo"; filename="endless.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`,
    );
    const chunk = Buffer.alloc(1024 * 1024, 0xab);
    let sent = 0;
    const answer = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = httpRequest(new URL(`/api/observations/${entry}/photos`, t.url), {
        method: 'POST',
        headers: { cookie, 'content-type': `multipart/form-data; boundary=${boundary}`, ...headers },
      });
      let answered = false;
      req.on('response', (res) => {
        answered = true;
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (d: string) => (body += d));
        res.on('end', () => {
          resolve({ status: res.statusCode ?? 0, body });
          req.destroy();
        });
      });
      // Once the server has answered and closed, writing fails; the answer is what counts. A write
      // can fail just before the answer is read, so a closed pipe waits a moment for it.
      req.on('error', (err) => {
        if (answered) return;
        const code = (err as NodeJS.ErrnoException).code;
        if (code === 'EPIPE' || code === 'ECONNRESET') setTimeout(() => (answered ? undefined : reject(err)), 2000);
        else reject(err);
      });
      // One chunk per turn of the event loop, so an answer that has arrived is heard before the next write.
      const pump = () => {
        if (answered || sent >= total) return;
        sent += chunk.length;
        if (req.write(sent === chunk.length ? Buffer.concat([head, chunk]) : chunk)) setImmediate(pump);
        else req.once('drain', pump);
      };
      pump();
    });
    return { ...answer, sent };
  }

  it('answers 413 as soon as a file passes 25 MB, so the sender stops long before the end of the body, and stores nothing', async () => {
    const entry = await newEntry();
    const [rowsBefore, filesBefore] = [photoRows(), await storedFiles()];
    const total = 200 * 1024 * 1024;
    const res = await streamUpload(entry, total);
    expect(res.status).toBe(413);
    expect(JSON.parse(res.body)).toEqual({ error: { code: 'too_large', message: expect.stringMatching(/25 MB/) } });
    // Read and discarded to the end, the client would have sent all 200 MB before hearing anything.
    expect(res.sent).toBeLessThan(80 * 1024 * 1024);
    expect(photoRows()).toBe(rowsBefore);
    expect(await storedFiles()).toEqual(filesBefore);
  });

  it('refuses a body announced larger than any upload can be before reading it', async () => {
    const entry = await newEntry();
    const res = await streamUpload(entry, 300 * 1024 * 1024, { 'content-length': String(300 * 1024 * 1024) });
    expect(res.status).toBe(413);
    expect(JSON.parse(res.body).error.code).toBe('too_large');
    expect(res.sent).toBeLessThan(80 * 1024 * 1024);
  });

  it('decodes at most two photos at once, and runs every one that waits', async () => {
    expect(PHOTO_SLOTS).toBeLessThanOrEqual(2);
    const run = workQueue(PHOTO_SLOTS);
    let running = 0;
    let most = 0;
    const done = await Promise.all(
      Array.from({ length: 7 }, (_, i) =>
        run(async () => {
          running++;
          most = Math.max(most, running);
          await new Promise((r) => setTimeout(r, 5));
          running--;
          if (i === 3) throw new Error('one photo fails');
          return i;
        }).catch(() => -1),
      ),
    );
    expect(done).toEqual([0, 1, 2, -1, 4, 5, 6]);
    expect(most).toBe(PHOTO_SLOTS);
  });

  it('processes every photo of many uploads sent at once', async () => {
    const agent = await t.signIn(emails.biologist);
    const entries = await Promise.all(Array.from({ length: 5 }, () => newEntry()));
    const rowsBefore = photoRows();
    const results = await Promise.all(
      entries.map(async (entry, i) =>
        upload(agent, entry, [
          { data: await jpegWithExif({}, { width: 1200 + i * 10, height: 900 }), name: `a-${i}.jpg` },
          { data: await tinyJpeg(`#${(i * 30 + 16).toString(16)}2040`), name: `b-${i}.jpg` },
        ]),
      ),
    );
    expect(results.map((r) => r.status)).toEqual([201, 201, 201, 201, 201]);
    for (const r of results) expect(photoUploadResultSchema.parse(r.body).photos).toHaveLength(2);
    expect(photoRows()).toBe(rowsBefore + 10);
  });
});

describe('editing and retiring photos', () => {
  it('edits caption and credit, and reorders', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await upload(agent, entry, [
      { data: await tinyJpeg('#111111'), name: '1.jpg' },
      { data: await tinyJpeg('#222222'), name: '2.jpg' },
      { data: await tinyJpeg('#333333'), name: '3.jpg' },
    ]);
    expect(res.status).toBe(201);
    const [a, b, c] = (res.body.photos as Photo[]).map((p) => p.id);
    expect((res.body.photos as Photo[]).map((p) => p.position)).toEqual([0, 1, 2]);

    const edited = await agent.patch(`/api/photos/${b}`).send({ caption: 'Hexactinellid sponge, close up', credit: 'ROV Skerry camera 2' });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ caption: 'Hexactinellid sponge, close up', credit: 'ROV Skerry camera 2' });

    expect((await agent.patch(`/api/photos/${c}`).send({ position: 0 })).status).toBe(200);
    const detail = observationDetailSchema.parse((await agent.get(`/api/observations/${entry}`)).body);
    expect(detail.photos.map((p) => p.id)).toEqual([c, a, b]);
    expect(detail.photos.map((p) => p.position)).toEqual([0, 1, 2]);

    const cleared = await agent.patch(`/api/photos/${b}`).send({ caption: '' });
    expect(cleared.body.caption).toBeNull();

    const bad = await agent.patch(`/api/photos/${b}`).send({ uploadedBy: 'someone-else' });
    expect(bad.status).toBe(400);
    const empty = await agent.patch(`/api/photos/${b}`).send({});
    expect(empty.status).toBe(400);
  });

  it('takes a caption and a credit sent beside the file, and refuses other fields', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await agent
      .post(`/api/observations/${entry}/photos`)
      .field('caption', 'Sponge on the sternpost')
      .field('credit', 'Cleo Varga')
      .attach('photo', await tinyJpeg('#3a3a3a'), { filename: 's.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(201);
    expect(res.body.photos[0]).toMatchObject({
      caption: 'Sponge on the sternpost',
      credit: 'Cleo Varga',
      uploadedBy: ids.userId(emails.biologist),
    });
    const before = photoRows();
    const sneaky = await agent
      .post(`/api/observations/${entry}/photos`)
      .field('uploadedBy', ids.userId(emails.lead))
      .attach('photo', await tinyJpeg('#3b3b3b'), { filename: 't.jpg', contentType: 'image/jpeg' });
    expect(sneaky.status).toBe(400);
    expect(photoRows()).toBe(before);
  });

  it('retires a photo: gone from the entry, the gallery and the file route', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const res = await upload(agent, entry, [{ data: await tinyJpeg('#444444'), name: 'r.jpg' }]);
    const id = res.body.photos[0].id as string;
    expect((await agent.get(`/api/photos/${id}?size=thumb`)).status).toBe(200);
    const del = await agent.delete(`/api/photos/${id}`);
    expect(del.status).toBe(204);
    expect(rowOf(id).retired).toBe(true);
    for (const size of ['thumb', 'display', 'original']) expect((await agent.get(`/api/photos/${id}?size=${size}`)).status).toBe(404);
    expect((await agent.get(`/api/observations/${entry}`)).body.photos).toEqual([]);
    const gallery = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=200`)).body);
    expect(gallery.items.map((p) => p.id)).not.toContain(id);
    expect((await agent.patch(`/api/photos/${id}`).send({ caption: 'x' })).status).toBe(404);
    // Nothing is hard-deleted: the files stay where they were.
    expect(stored(rowOf(id).originalKey).length).toBeGreaterThan(0);
  });

  it('hides the photos of a retired entry and brings them back when it is restored', async () => {
    const agent = await t.signIn(emails.biologist);
    const lead = await t.signIn(emails.lead);
    const entry = await newEntry();
    const res = await upload(agent, entry, [{ data: await tinyJpeg('#555555'), name: 'e.jpg' }]);
    const id = res.body.photos[0].id as string;
    const retired = await agent.delete(`/api/observations/${entry}`);
    expect(retired.status).toBe(200);
    expect(t.ctx.db.select().from(observations).where(eq(observations.id, entry)).get()!.retired).toBe(true);
    for (const who of [agent, lead]) expect((await who.get(`/api/photos/${id}?size=thumb`)).status).toBe(404);
    const gallery = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=200`)).body);
    expect(gallery.items.map((p) => p.id)).not.toContain(id);
    expect((await upload(agent, entry, [{ data: await tinyJpeg('#565656'), name: 'late.jpg' }])).status).toBe(404);
    expect((await agent.patch(`/api/photos/${id}`).send({ caption: 'x' })).status).toBe(404);

    const restored = await lead.post(`/api/observations/${entry}/restore`).send({});
    expect(restored.status).toBe(200);
    expect((await agent.get(`/api/photos/${id}?size=thumb`)).status).toBe(200);
    const back = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=200`)).body);
    expect(back.items.map((p) => p.id)).toContain(id);
  });
});

describe('the dive gallery', () => {
  it('lists the dive’s photos with their entries, filters by kind and tag, and pages', async () => {
    const agent = await t.signIn(emails.archaeologist);
    const amphora = await newEntry(emails.archaeologist, { kind: 'archaeology', title: 'Amphora neck', tags: ['amphora'] });
    await upload(agent, amphora, [
      { data: await tinyJpeg('#aa1111'), name: 'a1.jpg' },
      { data: await tinyJpeg('#aa2222'), name: 'a2.jpg' },
    ]);
    const all = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=200`)).body);
    expect(all.total).toBe(all.items.length);
    expect(all.items.some((p) => p.observation.id === amphora && p.observation.tags.includes('amphora'))).toBe(true);

    const byKind = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?kind=archaeology&limit=200`)).body);
    expect(byKind.items.length).toBeGreaterThanOrEqual(2);
    expect(byKind.items.every((p) => p.observation.kind === 'archaeology')).toBe(true);

    const byTag = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?tag=AMPHORA&limit=200`)).body);
    expect(byTag.items.map((p) => p.observation.id)).toEqual([amphora, amphora]);
    expect(byTag.total).toBe(2);

    const first = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=3`)).body);
    expect(first.items).toHaveLength(3);
    expect(first.nextCursor).not.toBeNull();
    const second = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/photos?limit=3&cursor=${first.nextCursor}`)).body);
    expect(second.items.map((p) => p.id)).toEqual(all.items.slice(3, 6).map((p) => p.id));

    expect((await agent.get(`/api/dives/${ids.dive}/photos?cursor=abc`)).status).toBe(400);
    expect((await agent.get(`/api/dives/${ids.dive}/photos?kind=poetry`)).status).toBe(400);
    const other = galleryPageSchema.parse((await agent.get(`/api/dives/${ids.otherDive}/photos`)).body);
    expect(other.items).toEqual([]);
  });
});

describe('live updates', () => {
  it('tells the dive’s readers that the entry changed, with its new photo count', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const events: LiveEvent[] = [];
    const stop = t.ctx.live.subscribeAll((e) => events.push(e));
    try {
      await upload(agent, entry, [{ data: await tinyJpeg('#666666'), name: 'l.jpg' }]);
    } finally {
      stop();
    }
    const event = events.find((e) => e.type === 'observation.updated' && (e.payload as { id: string }).id === entry);
    expect(event).toBeDefined();
    expect(event!.diveId).toBe(ids.dive);
    expect((event!.payload as { photoCount: number }).photoCount).toBe(1);
  });

  it('tells a member watching the dive’s stream of an upload, a caption edit, a move and a removal', async () => {
    const agent = await t.signIn(emails.biologist);
    const entry = await newEntry();
    const reader = openSse(`${t.url}/api/dives/${ids.dive}/stream`, { cookie: await t.sessionCookie(emails.guest) });
    try {
      expect(await reader.status).toBe(200);
      await reader.next((e) => e.event === 'ready', 15_000);
      // Each change must bring an event of its own: one about this entry, later than the last one seen.
      let last = 0;
      const nextAbout = async () => {
        const after = last;
        const e = await reader.next((x) => x.event === 'observation.updated' && Number(x.id) > after && x.data.includes(entry), 15_000);
        last = Number(e.id);
        return observationSchema.parse(JSON.parse(e.data));
      };

      const res = await upload(agent, entry, [
        { data: await tinyJpeg('#676767'), name: 'seen-live-1.jpg' },
        { data: await tinyJpeg('#686868'), name: 'seen-live-2.jpg' },
      ]);
      expect(res.status).toBe(201);
      const [first, second] = (res.body.photos as Photo[]).map((p) => p.id);
      expect(await nextAbout()).toMatchObject({ id: entry, diveId: ids.dive, photoCount: 2 });

      expect((await agent.patch(`/api/photos/${first}`).send({ caption: 'Sponge, seen live' })).status).toBe(200);
      expect(await nextAbout()).toMatchObject({ id: entry, photoCount: 2 });

      expect((await agent.patch(`/api/photos/${second}`).send({ position: 0 })).status).toBe(200);
      expect(await nextAbout()).toMatchObject({ id: entry, photoCount: 2 });

      expect((await agent.delete(`/api/photos/${first}`)).status).toBe(204);
      expect(await nextAbout()).toMatchObject({ id: entry, photoCount: 1 });

      // A refused edit changes nothing, so it announces nothing (the hub publishes before the answer).
      const published: LiveEvent[] = [];
      const stop = t.ctx.live.subscribeAll((e) => published.push(e));
      try {
        expect((await agent.patch(`/api/photos/${second}`).send({})).status).toBe(400);
      } finally {
        stop();
      }
      expect(published).toEqual([]);
    } finally {
      reader.close();
    }
  });
});

describe('storage', () => {
  it('keeps no temporary file after uploads', async () => {
    const files = await storedFiles();
    expect(files.filter((f) => f.startsWith('.incoming'))).toEqual([]);
    const keys = t.ctx.db
      .select({ o: photos.originalKey, d: photos.displayKey, t: photos.thumbKey })
      .from(photos)
      .where(eq(photos.campaignId, ids.campaign))
      .all()
      .flatMap((r) => [r.o, r.d, r.t]);
    expect(files.sort()).toEqual(keys.sort());
  });
});
