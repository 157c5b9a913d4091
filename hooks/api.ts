/**
 * The one typed client for the Bathynote API. Every response is parsed with the same zod schema
 * the server answers with, and every failure becomes one `ApiError` in the contract's shape.
 */
import { Platform } from 'react-native';
import type { z } from 'zod';

// Straight from the module, not the index of every schema: the sign-in screen loads this file.
import { apiErrorSchema, type ApiErrorBody } from '@/lib/schemas/core';

/** Same origin on the web; a native build points at the ship's server. */
const configuredBase: unknown = process.env.EXPO_PUBLIC_API_URL;
const base = Platform.OS === 'web' || typeof configuredBase !== 'string' ? '' : configuredBase;

/** The full address of an API path (for images, uploads and streams, which do not go through `request`). */
export const apiUrl = (path: string) => `${base}${path}`;

export type FieldIssue = NonNullable<ApiErrorBody['error']['issues']>[number];

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly issues: FieldIssue[] = [],
  ) {
    super(message);
  }

  /** True when the request never reached the server (offline, DNS, dropped link). */
  get isNetwork() {
    return this.status === 0;
  }
}

type Options = { method?: string; body?: unknown; signal?: AbortSignal };

export async function request<S extends z.ZodType>(path: string, schema: S, options: Options = {}): Promise<z.output<S>> {
  let response: Response;
  try {
    response = await fetch(`${base}${path}`, {
      method: options.method ?? (options.body === undefined ? 'GET' : 'POST'),
      credentials: 'include',
      headers:
        options.body === undefined ? { accept: 'application/json' } : { accept: 'application/json', 'content-type': 'application/json' },
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (err) {
    if ((err as Error).name === 'AbortError') throw err;
    throw new ApiError(0, 'network', 'No connection to the ship’s server. Your entry is kept; try again.');
  }
  return answer(response.status, response.ok, await response.text(), schema);
}

/**
 * Reads an answer the same way for every call: the contract's error shape becomes an `ApiError`
 * with its code and field issues, and a success is parsed with the schema the server answers with.
 */
function answer<S extends z.ZodType>(status: number, ok: boolean, text: string, schema: S): z.output<S> {
  const json: unknown = text ? safeJson(text) : undefined;
  if (!ok) {
    const parsed = apiErrorSchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new ApiError(status, e.code, e.message, e.issues ?? []);
    }
    const message = (json as { message?: string } | undefined)?.message;
    throw new ApiError(status, 'http_error', message ?? `The server answered ${status}.`);
  }
  const result = schema.safeParse(json);
  if (!result.success) {
    throw new ApiError(status, 'bad_response', 'The server sent an answer this app does not understand. Reload the page.');
  }
  return result.data;
}

export type UploadOptions = {
  /** Bytes sent so far and the whole body's size (when the browser knows it). */
  onProgress?: (sent: number, total: number | undefined) => void;
  /** Every byte is sent; the server is now reading them. */
  onSent?: () => void;
  signal?: AbortSignal;
};

/**
 * A multipart upload that reports its progress: over XMLHttpRequest, the one browser API with
 * upload events (fetch has none). Stopped through `signal` (an `ApiError` with code `aborted`);
 * the answer goes through the same reading as every other call.
 */
export function upload<S extends z.ZodType>(path: string, schema: S, body: FormData, options: UploadOptions = {}): Promise<z.output<S>> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', apiUrl(path));
    xhr.withCredentials = true;
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => options.onProgress?.(e.loaded, e.lengthComputable && e.total > 0 ? e.total : undefined);
    xhr.upload.onload = () => options.onSent?.();
    xhr.onload = () => {
      try {
        resolve(answer(xhr.status, xhr.status >= 200 && xhr.status < 300, xhr.responseText, schema));
      } catch (err) {
        reject(
          err instanceof Error ? err : new ApiError(xhr.status, 'bad_response', 'The server sent an answer this app does not understand.'),
        );
      }
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload was cut off: no connection to the ship’s server. Try again.'));
    xhr.ontimeout = () => reject(new ApiError(0, 'network', 'The upload timed out.'));
    xhr.onabort = () => reject(new ApiError(0, 'aborted', 'The upload was stopped.'));
    if (options.signal?.aborted) return reject(new ApiError(0, 'aborted', 'The upload was stopped.'));
    options.signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(body);
  });
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}
