/**
 * The one typed client for the Bathynote API. Every response is parsed with the same zod schema
 * the server answers with, and every failure becomes one `ApiError` in the contract's shape.
 */
import { Platform } from 'react-native';
import type { z } from 'zod';

import { apiErrorSchema, type ApiErrorBody } from '@/lib/schemas';

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
  const text = await response.text();
  const json: unknown = text ? safeJson(text) : undefined;
  if (!response.ok) {
    const parsed = apiErrorSchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new ApiError(response.status, e.code, e.message, e.issues ?? []);
    }
    const message = (json as { message?: string } | undefined)?.message;
    throw new ApiError(response.status, 'http_error', message ?? `The server answered ${response.status}.`);
  }
  const result = schema.safeParse(json);
  if (!result.success) {
    throw new ApiError(response.status, 'bad_response', 'The server sent an answer this app does not understand. Reload the page.');
  }
  return result.data;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}
