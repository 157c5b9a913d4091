/**
 * Turning an uploaded file into the three files Bathynote keeps: the type is decided by the
 * bytes (never the name or the header), the pixel count is checked from the header before
 * anything is decoded, and every size is re-encoded by sharp, which applies the orientation and
 * leaves behind whatever the upload carried besides its pixels (scripts after the end marker,
 * text chunks, camera serials, GPS unless the campaign keeps positions).
 */
import exifr from 'exifr';
import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Sharp } from 'sharp';

import { photoLimits } from '../../lib/schemas';
import { ApiError } from '../errors';

export type Encoded = { data: Buffer; mime: string; ext: 'jpg' | 'png' | 'webp' };

export type ProcessedPhoto = {
  width: number;
  height: number;
  capturedAt: Date | null;
  lat: number | null;
  lon: number | null;
  original: Encoded;
  display: Encoded;
  thumb: Encoded;
};

/**
 * libvips works on one image at a time with one thread, and keeps no cache of decoded images
 * between requests: a 100-megapixel photo decodes to about 300 MB, so what the process holds is
 * bounded by how many photos are decoded at once, set below, not by how many uploads arrive.
 */
sharp.concurrency(1);
sharp.cache(false);

/** Photos decoded and re-encoded at once; the others wait their turn (their upload already read). */
export const PHOTO_SLOTS = 2;

/** A first-come, first-served queue that runs at most `slots` pieces of work at once. */
export function workQueue(slots: number) {
  let running = 0;
  const waiting: (() => void)[] = [];
  return async function run<T>(work: () => Promise<T>): Promise<T> {
    if (running >= slots) await new Promise<void>((resolve) => waiting.push(resolve));
    else running++;
    try {
      return await work();
    } finally {
      const next = waiting.shift();
      if (next) next();
      else running--;
    }
  };
}

const decoding = workQueue(PHOTO_SLOTS);

const HEIC_TYPES = new Set(['image/heic', 'image/heif', 'image/heic-sequence', 'image/heif-sequence']);
const TAKEN = new Set(['image/jpeg', 'image/png', 'image/webp']);

const unsupported = (message: string) => new ApiError(415, 'unsupported_type', message);

const HEIC_MESSAGE =
  'This server cannot read HEIC photos. Export the photo as JPEG and upload that (on an iPhone: Settings › Camera › Formats › Most Compatible, or share the photo as JPEG).';

async function detectType(data: Buffer, name: string): Promise<string> {
  const detected = await fileTypeFromBuffer(data);
  const mime = detected?.mime;
  if (mime && (TAKEN.has(mime) || HEIC_TYPES.has(mime))) return mime;
  const what = mime ? `a ${mime} file` : 'not an image Bathynote can read';
  throw unsupported(`"${safeName(name)}" is ${what}. Upload JPEG, PNG or WebP photos (HEIC where the server can read it).`);
}

/** A file name fit to quote back in a message: printable, short. */
export function safeName(name: string): string {
  const clean = name.replace(/[^\p{L}\p{N} ._()-]/gu, '_').slice(0, 80);
  return clean || 'The file';
}

/** sharp's metadata reads the header only: a bomb's huge dimensions are seen before any decoding. */
async function readHeader(data: Buffer, mime: string, name: string) {
  try {
    return await sharp(data, { limitInputPixels: false }).metadata();
  } catch {
    if (HEIC_TYPES.has(mime)) throw unsupported(HEIC_MESSAGE);
    throw unsupported(`"${safeName(name)}" could not be read as an image; it may be damaged.`);
  }
}

function tiffOf(exif: Buffer | undefined): Buffer | undefined {
  if (!exif || exif.length < 8) return undefined;
  return exif.subarray(0, 6).toString('latin1') === 'Exif\0\0' ? exif.subarray(6) : exif;
}

type ExifFields = {
  DateTimeOriginal?: unknown;
  CreateDate?: unknown;
  OffsetTimeOriginal?: unknown;
  OffsetTimeDigitized?: unknown;
  SubSecTimeOriginal?: unknown;
  SubSecTimeDigitized?: unknown;
  latitude?: unknown;
  longitude?: unknown;
};

/**
 * The capture time in an EXIF block. EXIF times carry no zone of their own; the offset tag is
 * used where the camera wrote one, and otherwise the time is taken as UTC, because ship and
 * vehicle cameras are kept on UTC (common practice). Never read as the server's local time.
 */
export function captureTimeOf(fields: ExifFields): Date | null {
  const raw = typeof fields.DateTimeOriginal === 'string' ? fields.DateTimeOriginal : fields.CreateDate;
  if (typeof raw !== 'string') return null;
  const m = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/.exec(raw.trim());
  if (!m) return null;
  const usingOriginal = raw === fields.DateTimeOriginal;
  const offsetRaw = usingOriginal ? fields.OffsetTimeOriginal : fields.OffsetTimeDigitized;
  const subRaw = usingOriginal ? fields.SubSecTimeOriginal : fields.SubSecTimeDigitized;
  const offset = typeof offsetRaw === 'string' && /^[+-]\d{2}:\d{2}$/.test(offsetRaw.trim()) ? offsetRaw.trim() : 'Z';
  const sub = typeof subRaw === 'string' || typeof subRaw === 'number' ? String(subRaw).trim() : '';
  const ms = /^\d+$/.test(sub) ? sub.slice(0, 3).padEnd(3, '0') : '000';
  const [, y, mo, d, h, mi, s] = m;
  const date = new Date(`${y}-${mo}-${d}T${h}:${mi}:${s}.${ms}${offset}`);
  if (Number.isNaN(date.getTime()) || Number(y) < 1990) return null;
  return date;
}

async function readExif(exif: Buffer | undefined): Promise<ExifFields> {
  const tiff = tiffOf(exif);
  if (!tiff) return {};
  try {
    const parsed = (await exifr.parse(tiff, {
      tiff: true,
      exif: true,
      gps: true,
      ifd1: false,
      interop: false,
      xmp: false,
      icc: false,
      iptc: false,
      reviveValues: false,
      translateValues: false,
    })) as ExifFields | undefined;
    return parsed ?? {};
  } catch {
    // A damaged EXIF block only costs the capture time and position; the pixels are still good.
    return {};
  }
}

const finite = (v: unknown, limit: number): number | null =>
  typeof v === 'number' && Number.isFinite(v) && Math.abs(v) <= limit ? Math.round(v * 1e7) / 1e7 : null;

/** Date and offset written back into a re-encoded original, so the file still says when it was taken. */
function exifDate(at: Date): Record<string, string> {
  const iso = at.toISOString();
  return {
    DateTimeOriginal: `${iso.slice(0, 10).replaceAll('-', ':')} ${iso.slice(11, 19)}`,
    SubSecTimeOriginal: iso.slice(20, 23),
    OffsetTimeOriginal: '+00:00',
  };
}

function encodeOriginal(pipeline: Sharp, mime: string): Promise<Encoded> {
  if (mime === 'image/png') {
    return pipeline
      .png({ compressionLevel: 6 })
      .toBuffer()
      .then((data) => ({ data, mime: 'image/png', ext: 'png' as const }));
  }
  if (mime === 'image/webp') {
    return pipeline
      .webp({ quality: 90 })
      .toBuffer()
      .then((data) => ({ data, mime: 'image/webp', ext: 'webp' as const }));
  }
  // JPEG stays JPEG, and a HEIC the server could decode is kept as JPEG, which everyone can open.
  return pipeline
    .jpeg({ quality: 90 })
    .toBuffer()
    .then((data) => ({ data, mime: 'image/jpeg', ext: 'jpg' as const }));
}

function encodeSmaller(data: Buffer, edge: number, quality: number): Promise<Encoded> {
  return sharp(data, { limitInputPixels: photoLimits.maxPixels, failOn: 'error' })
    .rotate()
    .resize({ width: edge, height: edge, fit: 'inside', withoutEnlargement: true })
    .webp({ quality })
    .toBuffer()
    .then((out) => ({ data: out, mime: 'image/webp', ext: 'webp' as const }));
}

/**
 * Checks, reads and re-encodes one uploaded file, waiting for a free slot first. Refusals are
 * `ApiError`s: 415 for a type that is not taken or a file that will not decode, 413 for too many pixels.
 */
export function processPhoto(data: Buffer, name: string, options: { keepPositions: boolean }): Promise<ProcessedPhoto> {
  return decoding(() => processOne(data, name, options));
}

async function processOne(data: Buffer, name: string, options: { keepPositions: boolean }): Promise<ProcessedPhoto> {
  const mime = await detectType(data, name);
  const header = await readHeader(data, mime, name);
  const pixels = (header.width ?? 0) * (header.height ?? 0);
  if (pixels > photoLimits.maxPixels) {
    throw new ApiError(
      413,
      'too_many_pixels',
      `"${safeName(name)}" is ${header.width} × ${header.height} pixels; photos may have at most ${photoLimits.maxPixels / 1_000_000} million.`,
    );
  }
  if (!header.width || !header.height) throw unsupported(`"${safeName(name)}" has no picture in it.`);

  const fields = await readExif(header.exif);
  const capturedAt = captureTimeOf(fields);
  const lat = options.keepPositions ? finite(fields.latitude, 90) : null;
  const lon = options.keepPositions && lat !== null ? finite(fields.longitude, 180) : null;

  const base = sharp(data, { limitInputPixels: photoLimits.maxPixels, failOn: 'error' }).rotate().keepIccProfile();
  // With positions kept the camera's whole EXIF block goes along (sharp resets its orientation);
  // without, the original carries only the capture time.
  const pipeline = options.keepPositions ? base.keepExif() : capturedAt ? base.withExif({ IFD2: exifDate(capturedAt) }) : base;

  let original: Encoded;
  try {
    original = await encodeOriginal(pipeline, mime);
  } catch {
    if (HEIC_TYPES.has(mime)) throw unsupported(HEIC_MESSAGE);
    throw unsupported(`"${safeName(name)}" could not be decoded; it may be damaged or cut short.`);
  }
  // One after the other: each decodes the whole original again, and at once they would hold three.
  const size = await sharp(original.data).metadata();
  const display = await encodeSmaller(original.data, photoLimits.displayEdge, 82);
  const thumb = await encodeSmaller(original.data, photoLimits.thumbEdge, 70);
  return {
    width: size.width ?? header.width,
    height: size.height ?? header.height,
    capturedAt,
    lat: lon === null ? null : lat,
    lon,
    original,
    display,
    thumb,
  };
}
