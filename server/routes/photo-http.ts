/** The HTTP side of photos: reading multipart uploads within limits, and sending stored files. */
import type { Request, RequestHandler, Response } from 'express';
import multer, { MulterError } from 'multer';

import { photoLimits } from '../../lib/schemas';
import { ApiError, fieldError, notFound } from '../errors';
import type { PhotoFile } from '../services/photos';
import type { PhotoStorage } from '../services/photo-storage';

const MB = 1024 * 1024;

/** The largest body an upload can have: every file at its limit, and room for the parts' headers and the text fields. */
const MAX_BODY = photoLimits.maxFiles * (photoLimits.maxBytes + 64 * 1024) + 64 * 1024;

/** busboy as multer hands it over: the request is written into it, and it reports the limits it meets. */
type Busboy = NodeJS.WritableStream & {
  on(event: 'file', listener: (field: string, file: NodeJS.ReadableStream) => void): Busboy;
  on(event: 'filesLimit' | 'partsLimit' | 'fieldsLimit', listener: () => void): Busboy;
};

/**
 * How long the rest of a refused body is read and dropped before the connection is cut. Closing a
 * connection while the client is still sending makes the server's system answer the next bytes
 * with a reset, and a reset throws away the refusal the client has not read yet; a moment of
 * reading first (a lingering close) lets the client hear the answer and stop sending.
 */
const LINGER_MS = 2000;

/**
 * Answers the refusal as soon as a limit is passed and stops parsing: the rest of the body is only
 * drained for a moment and then cut off (multer on its own would read and parse it all before
 * answering).
 */
function refuseNow(req: Request, err: ApiError) {
  const res = req.res;
  if (!res || res.headersSent) return;
  req.unpipe();
  res.status(err.status).json(err.toBody());
  const cut = setTimeout(() => req.socket.destroy(), LINGER_MS);
  req.once('end', () => clearTimeout(cut));
  req.resume();
}

function feedUntilLimit(req: Request, busboy: Busboy) {
  const refuse = (code: ConstructorParameters<typeof MulterError>[0]) => () => refuseNow(req, translate(new MulterError(code)));
  busboy.on('file', (_field, file) => file.on('limit', refuse('LIMIT_FILE_SIZE')));
  busboy.on('filesLimit', refuse('LIMIT_FILE_COUNT'));
  busboy.on('partsLimit', refuse('LIMIT_PART_COUNT'));
  busboy.on('fieldsLimit', refuse('LIMIT_FIELD_COUNT'));
  req.pipe(busboy);
}

/**
 * multer with every limit set: its defaults are unlimited. Memory storage is enough because each
 * file is capped, and it means an upload cut off half way has written nothing anywhere.
 */
const parser = multer({
  streamHandler: feedUntilLimit,
  storage: multer.memoryStorage(),
  limits: {
    fileSize: photoLimits.maxBytes,
    files: photoLimits.maxFiles,
    fields: 4,
    parts: photoLimits.maxFiles + 4,
    fieldNameSize: 64,
    fieldSize: 4096,
    headerPairs: 20,
  },
} as multer.Options & { streamHandler: typeof feedUntilLimit }).array('photo', photoLimits.maxFiles);

function translate(err: unknown): ApiError {
  if (err instanceof MulterError) {
    switch (err.code) {
      case 'LIMIT_FILE_SIZE':
        return new ApiError(413, 'too_large', `A photo may be at most ${photoLimits.maxBytes / MB} MB.`);
      case 'LIMIT_FILE_COUNT':
        return new ApiError(413, 'too_many_files', `Send at most ${photoLimits.maxFiles} photos at once.`);
      case 'LIMIT_PART_COUNT':
      case 'LIMIT_FIELD_COUNT':
        return new ApiError(413, 'too_many_parts', 'The upload has too many parts.');
      case 'LIMIT_FIELD_KEY':
      case 'LIMIT_FIELD_VALUE':
        return new ApiError(413, 'too_large', 'A text field of the upload is too long.');
      case 'LIMIT_UNEXPECTED_FILE':
        return fieldError(err.field ?? '(body)', 'Unexpected file field', 'Send photos in the field "photo".');
      default:
        return new ApiError(400, 'bad_multipart', 'The upload could not be read.');
    }
  }
  return new ApiError(400, 'bad_multipart', 'The upload could not be read; it may have been cut off.');
}

/** Parses `multipart/form-data`; every failure comes out in the contract's error shape. */
export const readPhotoUpload: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) {
    next(fieldError('photo', 'No file was sent', 'Send the photos as multipart/form-data in the field "photo".'));
    return;
  }
  // A body announced larger than any upload can be is refused before a byte of it is read.
  if (Number(req.headers['content-length'] ?? 0) > MAX_BODY) {
    refuseNow(
      req,
      new ApiError(413, 'too_large', `Send at most ${photoLimits.maxFiles} photos of ${photoLimits.maxBytes / MB} MB each at once.`),
    );
    return;
  }
  parser(req, res, (err?: unknown) => next(err ? translate(err) : undefined));
};

export function uploadedFiles(req: Request): { buffer: Buffer; originalname: string }[] {
  return Array.isArray(req.files) ? req.files : [];
}

/**
 * Sends one stored file: its real type, never sniffed, sandboxed if opened on its own, with a
 * generated name, and cacheable by this browser only (revalidated with its ETag).
 */
export async function sendPhotoFile(req: Request, res: Response, storage: PhotoStorage, photoId: string, size: string, file: PhotoFile) {
  res.setHeader('Content-Type', file.mime);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
  res.setHeader('Content-Disposition', `inline; filename="bathynote-photo-${photoId.replace(/[^a-zA-Z0-9-]/g, '')}-${size}.${file.ext}"`);
  res.setHeader('Cache-Control', 'private, max-age=86400');
  res.setHeader('Vary', 'Cookie');
  res.setHeader('ETag', file.etag);
  if (req.fresh) {
    res.status(304).end();
    return;
  }
  const stored = await storage.stream(file.key);
  if (!stored) throw notFound('The file of this photo is missing.');
  res.setHeader('Content-Length', String(stored.bytes));
  if (req.method === 'HEAD') {
    stored.body.destroy();
    res.end();
    return;
  }
  await new Promise<void>((resolve, reject) => {
    stored.body.once('error', reject);
    res.once('close', () => {
      stored.body.destroy();
      resolve();
    });
    stored.body.pipe(res);
  });
}
