/**
 * `npm run bench -- photo-load`: four uploads sent at once, each of ten PNGs of 10,000 × 10,000
 * pixels (at the 100-megapixel limit), to the server as `npm start` runs it (its bundle, demo
 * seeded, in a process of its own). Every PNG differs by a text chunk, so each is decoded and
 * re-encoded rather than recognised as a file already on the entry. Prints the answers, the time,
 * the server's CPU time and its resident memory before, at its peak (read from /proc: the server's
 * own process, not this one) and after, beside the target (≤ 600 MB peak); asserts nothing.
 * `PHOTO_LOAD_REQUESTS` and `PHOTO_LOAD_FILES` change the four and the ten.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';

import sharp from 'sharp';

import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const REQUESTS = Number(process.env.PHOTO_LOAD_REQUESTS ?? 4);
const FILES = Number(process.env.PHOTO_LOAD_FILES ?? 10);
const EDGE = 10_000;
const TARGET_MB = 600;

/** CRC-32 as PNG chunks carry it (ISO/IEC 15948, annex D: polynomial 0xEDB88320). */
const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(data: Buffer): number {
  let c = 0xffffffff;
  for (const byte of data) c = CRC_TABLE[(c ^ byte) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** The same PNG with a tEXt chunk after its header (8-byte signature, 25-byte IHDR), so its bytes differ. */
function withText(png: Buffer, text: string): Buffer {
  const body = Buffer.concat([Buffer.from('tEXt'), Buffer.from(`Comment\0${text}`, 'latin1')]);
  const chunk = Buffer.alloc(body.length + 8);
  chunk.writeUInt32BE(body.length - 4, 0);
  body.copy(chunk, 4);
  chunk.writeUInt32BE(crc32(body), body.length + 4);
  return Buffer.concat([png.subarray(0, 33), chunk, png.subarray(33)]);
}

/** CPU seconds the process has used (user and system), from /proc/<pid>/stat in clock ticks of 1/100 s. */
function cpuSecondsOf(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

export async function benchPhotoLoad(): Promise<void> {
  // A sea-blue field with a band across it: cheap to write here, the full 100 megapixels to decode there.
  const base = await sharp({ create: { width: EDGE, height: EDGE, channels: 3, background: { r: 16, g: 64, b: 96 } } })
    .composite([
      {
        input: { create: { width: EDGE, height: 400, channels: 3, background: { r: 200, g: 180, b: 120 } } },
        top: EDGE / 2,
        left: 0,
      },
    ])
    .png({ compressionLevel: 9 })
    .toBuffer();
  const server = await startServerProcess({ LOG_LEVEL: 'error' });
  try {
    const pid = server.child.pid!;
    const cookie = await signIn(server.url, 'biologist@bathynote.test', 'bathynote-demo');
    const api = async <T>(url: string, init: RequestInit = {}): Promise<T> => {
      const res = await fetch(`${server.url}${url}`, {
        ...init,
        headers: {
          cookie,
          origin: server.url,
          ...(init.body && typeof init.body === 'string' ? { 'content-type': 'application/json' } : {}),
        },
      });
      if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${url}: ${res.status} ${await res.text()}`);
      return (await res.json()) as T;
    };
    const list = <T>(page: T[] | { items: T[] }) => (Array.isArray(page) ? page : page.items);
    const campaign = list(await api<{ id: string }[] | { items: { id: string }[] }>('/api/campaigns'))[0]!.id;
    const dive = list(await api<{ id: string }[] | { items: { id: string }[] }>(`/api/campaigns/${campaign}/dives`))[0]!.id;
    const entries: string[] = [];
    for (let r = 0; r < REQUESTS; r++) {
      const entry = await api<{ id: string }>(`/api/dives/${dive}/observations`, {
        method: 'POST',
        body: JSON.stringify({ kind: 'environment', title: `Photo load ${r + 1}` }),
      });
      entries.push(entry.id);
    }
    await new Promise((r) => setTimeout(r, 2000));
    const before = memoryOf(pid);
    // From here the kernel's high-water mark counts only the uploads (clear_refs, Linux ≥ 4.0).
    writeFileSync(`/proc/${pid}/clear_refs`, '5');
    const load = os.loadavg()[0]!;
    const cpu0 = cpuSecondsOf(pid);
    const t0 = performance.now();
    const answers = await Promise.all(
      entries.map(async (entry, r) => {
        const form = new FormData();
        for (let f = 0; f < FILES; f++) {
          form.append(
            'photo',
            new Blob([new Uint8Array(withText(base, `request ${r} file ${f}`))], { type: 'image/png' }),
            `load-${r}-${f}.png`,
          );
        }
        const res = await fetch(`${server.url}/api/observations/${entry}/photos`, {
          method: 'POST',
          headers: { cookie, origin: server.url },
          body: form,
        });
        const body = (await res.json()) as { photos?: unknown[]; error?: { code: string } };
        return { status: res.status, photos: body.photos?.length ?? 0, error: body.error?.code, ms: performance.now() - t0 };
      }),
    );
    const seconds = (performance.now() - t0) / 1000;
    const cpu = cpuSecondsOf(pid) - cpu0;
    const peak = memoryOf(pid);
    await new Promise((r) => setTimeout(r, 3000));
    const after = memoryOf(pid);
    const mb = (v: number) => `${v.toFixed(0)} MB`;
    process.stdout.write(
      [
        `${REQUESTS} uploads at once, ${FILES} PNGs of ${EDGE} × ${EDGE} pixels each (${(base.length / 1024).toFixed(0)} KB a file); load ${load.toFixed(2)} on ${os.cpus().length} cores`,
        `answers: ${answers.map((a) => `${a.status} (${a.photos} photos${a.error ? `, ${a.error}` : ''}, ${(a.ms / 1000).toFixed(1)} s)`).join(', ')}`,
        `time: ${seconds.toFixed(1)} s for all; server CPU time ${cpu.toFixed(1)} s`,
        `server memory: peak ${mb(peak.peakMb)} while uploading   target <= ${TARGET_MB} MB   (${mb(before.rssMb)} before, ${mb(after.rssMb)} 3 s after; the server process as npm start runs it)`,
        '',
      ].join('\n'),
    );
  } finally {
    await server.stop();
  }
}
