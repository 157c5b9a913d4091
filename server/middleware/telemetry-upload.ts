/**
 * Receiving a telemetry log upload: multipart with explicit limits, the file streamed to a
 * temporary file and refused by its content (not its name) as soon as its first bytes show it
 * is not a text log.
 */
import { randomUUID } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';

import type { RequestHandler } from 'express';
import { fileTypeFromBuffer } from 'file-type';
import multer from 'multer';

import { ApiError, fieldError } from '../errors';

/** Largest log accepted: a day at 10 Hz with every channel stays well below it. */
export const MAX_LOG_BYTES = 200 * 1024 * 1024;
const MAX_LOG_MB = MAX_LOG_BYTES / (1024 * 1024);
/** Enough bytes for file-type to recognise any binary format, and for a header row. */
const SNIFF_BYTES = 64 * 1024;

export const tooLarge = () =>
  new ApiError(413, 'too_large', `The log is larger than ${MAX_LOG_MB} MB. Split it and import the parts with "append".`, [
    { path: 'file', message: `At most ${MAX_LOG_MB} MB` },
  ]);

const unsupported = (what: string) =>
  new ApiError(415, 'unsupported_type', `The file is ${what}, not a CSV telemetry log.`, [
    { path: 'file', message: 'Send the vehicle log as CSV text (comma, semicolon or tab separated)' },
  ]);

/**
 * Why the first bytes of an upload are not a CSV log, or null when they may be one. Binary
 * formats are told by their signatures; markup by its first character; other binary data by
 * NUL bytes, which no text log in UTF-8 or Latin-1 contains.
 */
export async function refusalOf(head: Buffer): Promise<ApiError | null> {
  if (head.length === 0) return null;
  const type = await fileTypeFromBuffer(head);
  if (type) return unsupported(`${type.ext.toUpperCase()} (${type.mime})`);
  if (head.includes(0)) {
    const utf16 = (head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff);
    return utf16
      ? new ApiError(415, 'unsupported_type', 'The log is saved as UTF-16 text; save it as UTF-8 CSV and import it again.', [
          { path: 'file', message: 'Save the log as UTF-8' },
        ])
      : unsupported('binary data');
  }
  const text = head
    .subarray(0, 2048)
    .toString('latin1')
    .replace(/^\uFEFF|^\xEF\xBB\xBF/, '');
  if (/^\s*</.test(text) || /<(html|script|svg|body|\?xml)\b/i.test(text)) return unsupported('HTML or XML');
  return null;
}

/** Copies the upload to a temporary file, checking its first bytes on the way. */
const logStorage: multer.StorageEngine = {
  _handleFile(_req, file, cb) {
    const target = path.join(tmpdir(), `bathynote-log-${randomUUID()}.csv`);
    let head: Buffer[] = [];
    let headBytes = 0;
    let checked = false;
    let size = 0;
    const check = (done: (err?: Error | null) => void) => {
      checked = true;
      const bytes = Buffer.concat(head);
      head = [];
      refusalOf(bytes).then((refusal) => done(refusal), done);
    };
    const sniffer = new Transform({
      transform(chunk: Buffer, _encoding, done) {
        size += chunk.length;
        if (checked) return done(null, chunk);
        head.push(chunk);
        headBytes += chunk.length;
        if (headBytes < SNIFF_BYTES) return done(null, chunk);
        check((err) => (err ? done(err) : done(null, chunk)));
      },
      flush(done) {
        if (checked) return done();
        check((err) => done(err));
      },
    });
    pipeline(file.stream, sniffer, createWriteStream(target, { flags: 'wx' })).then(
      () => cb(null, { path: target, size }),
      (err: Error) => {
        void rm(target, { force: true }).finally(() => cb(err));
      },
    );
  },
  _removeFile(_req, file, cb) {
    rm(file.path, { force: true }).then(() => cb(null), cb);
  },
};

const upload = multer({
  storage: logStorage,
  limits: { fileSize: MAX_LOG_BYTES, files: 1, fields: 8, parts: 9, fieldNameSize: 64, fieldSize: 16 * 1024, headerPairs: 32 },
}).single('file');

function uploadError(err: unknown): Error {
  if (err instanceof ApiError) return err;
  if (err instanceof multer.MulterError) {
    if (err.code === 'LIMIT_FILE_SIZE') return tooLarge();
    const message =
      err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT'
        ? 'Send one log, in the form field "file"'
        : `The form is not one this import reads (${err.message.toLowerCase()})`;
    return fieldError(err.field ?? 'file', message, 'The upload could not be read.');
  }
  return new ApiError(400, 'bad_request', 'The upload could not be read; send the log as multipart/form-data with the field "file".');
}

/**
 * Multipart reception of one log (field `file`) and a few option fields. A declared body far
 * over the limit is refused before a byte is read.
 */
export const receiveLog: RequestHandler = (req, res, next) => {
  const declared = Number(req.headers['content-length']);
  if (Number.isFinite(declared) && declared > MAX_LOG_BYTES + 1024 * 1024) throw tooLarge();
  upload(req, res, (err: unknown) => {
    if (err) next(uploadError(err));
    else next();
  });
};

/** Removes the temporary copy of an upload. */
export async function discardUpload(file: { path: string } | undefined): Promise<void> {
  if (file) await rm(file.path, { force: true });
}
