/**
 * Writing a file to the response a piece at a time, waiting whenever the client reads slower
 * than the file is made, so a large export never piles up in memory.
 */
import type { Response } from 'express';

export class ClientGone extends Error {
  constructor() {
    super('The client closed the download.');
  }
}

/** Resolves when the response can take more, or rejects when the client has gone. */
export function drained(res: Response): Promise<void> {
  if (res.destroyed) return Promise.reject(new ClientGone());
  if (!res.writableNeedDrain) return Promise.resolve();
  return new Promise((resolve, reject) => {
    const done = () => {
      res.off('drain', onDrain);
      res.off('close', onClose);
    };
    const onDrain = () => {
      done();
      resolve();
    };
    const onClose = () => {
      done();
      reject(new ClientGone());
    };
    res.on('drain', onDrain);
    res.on('close', onClose);
  });
}

/** Collects small pieces of text into chunks of about 64 kB before writing them. */
export class TextSink {
  private buffer: string[] = [];
  private size = 0;

  constructor(private res: Response) {}

  async push(text: string): Promise<void> {
    this.buffer.push(text);
    this.size += text.length;
    if (this.size >= 65_536) await this.flush();
  }

  async flush(): Promise<void> {
    if (this.size === 0) return;
    if (this.res.destroyed) throw new ClientGone();
    this.res.write(this.buffer.join(''));
    this.buffer = [];
    this.size = 0;
    await drained(this.res);
  }

  async end(): Promise<void> {
    await this.flush();
    this.res.end();
  }
}

/** Headers of a download: its type, its file name, and no caching (members-only data). */
export function startDownload(res: Response, type: string, fileName: string) {
  res.status(200);
  res.setHeader('Content-Type', type);
  res.setHeader('Content-Disposition', `attachment; filename="${fileName.replace(/[^\w.-]+/g, '-')}"`);
  res.setHeader('Cache-Control', 'no-store');
}

/** Runs an export; a client that leaves mid-way ends it quietly, anything else cuts the response off. */
export async function streamExport(res: Response, write: () => Promise<void>): Promise<void> {
  try {
    await write();
  } catch (err) {
    if (err instanceof ClientGone) return;
    if (!res.headersSent) throw err;
    // Headers are gone: the only honest signal left is an incomplete response.
    res.destroy(err as Error);
  }
}
