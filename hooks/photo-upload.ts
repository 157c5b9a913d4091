/**
 * Photo uploads that survive a thin link: one request per file through the API client's upload
 * (which reports progress), cancelled by aborting it, and retried with growing
 * pauses when the link drops. The queue of each entry lives outside React, so leaving the screen
 * does not stop an upload that is under way.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useSyncExternalStore } from 'react';

import { photoLimits, photoUploadResultSchema, type PhotoUploadResult } from '@/lib/schemas';
import { ApiError, upload } from './api';
import { afterPhotosChanged } from './cache-effects';

/** A file as the picker or a drop gives it: a browser `File`, or a native file address. */
export type PickedFile = {
  name: string;
  mime: string;
  size: number | undefined;
  /** A local address for the preview (blob: on the web, file: on a device). */
  previewUri: string;
  file?: Blob;
  uri?: string;
};

export type UploadStatus = 'queued' | 'uploading' | 'waiting' | 'failed' | 'done';

export type UploadItem = {
  id: string;
  name: string;
  previewUri: string;
  status: UploadStatus;
  /** 0 to 1. */
  progress: number;
  attempt: number;
  /** When the next automatic try starts (status `waiting`). */
  retryAt?: number;
  error?: string;
  photoId?: string;
};

const MAX_AUTOMATIC_TRIES = 5;
// One file at a time: on a thin link each photo then arrives as soon as it can, and in the order picked.
const PARALLEL = 1;
const DONE_SHOWN_MS = 6000;

/** A pause before try n + 1 that doubles each time, with some jitter so many readers do not retry in step. */
export function retryDelay(attempt: number): number {
  return Math.min(30_000, 1000 * 2 ** (attempt - 1)) * (0.8 + Math.random() * 0.4);
}

/** Errors worth trying again by themselves: the link, or a server or proxy that is briefly away. */
const transient = (err: ApiError) => err.isNetwork || err.status === 429 || err.status === 502 || err.status === 503 || err.status === 504;

function send(observationId: string, picked: PickedFile, onProgress: (fraction: number) => void) {
  const body = new FormData();
  if (picked.file) body.append('photo', picked.file, picked.name);
  // React Native's FormData takes a file address in this shape.
  else body.append('photo', { uri: picked.uri, name: picked.name, type: picked.mime } as unknown as Blob);
  const controller = new AbortController();
  const done = upload(`/api/observations/${encodeURIComponent(observationId)}/photos`, photoUploadResultSchema, body, {
    signal: controller.signal,
    onProgress: (sent, total) => {
      if (total) onProgress(sent / total);
    },
  });
  return { done, abort: () => controller.abort() };
}

type Entry = { id: string; diveId: string };

class UploadQueue {
  private items: UploadItem[] = [];
  private readonly files = new Map<string, PickedFile>();
  private readonly running = new Map<string, () => void>();
  private readonly timers = new Map<string, ReturnType<typeof setTimeout>>();
  private readonly listeners = new Set<() => void>();
  private readonly uploadedListeners = new Set<(result: PhotoUploadResult) => void>();

  constructor(private readonly entry: Entry) {}

  subscribe = (listener: () => void) => {
    this.listeners.add(listener);
    return () => {
      this.listeners.delete(listener);
    };
  };

  snapshot = () => this.items;

  /** Told of every finished upload, for as long as a screen shows this entry. */
  whenUploaded = (listener: (result: PhotoUploadResult) => void) => {
    this.uploadedListeners.add(listener);
    return () => {
      this.uploadedListeners.delete(listener);
    };
  };

  private set(id: string, change: Partial<UploadItem>) {
    this.items = this.items.map((i) => (i.id === id ? { ...i, ...change } : i));
    for (const l of this.listeners) l();
  }

  private drop(id: string) {
    const preview = this.files.get(id)?.previewUri;
    // Previews of browser files are object URLs that hold the file in memory until revoked.
    if (preview?.startsWith('blob:') && typeof URL.revokeObjectURL === 'function') URL.revokeObjectURL(preview);
    this.items = this.items.filter((i) => i.id !== id);
    this.files.delete(id);
    const timer = this.timers.get(id);
    if (timer) clearTimeout(timer);
    this.timers.delete(id);
    for (const l of this.listeners) l();
  }

  add(picked: PickedFile[]) {
    const added = picked.map((p): UploadItem => {
      const id = `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;
      this.files.set(id, p);
      const tooBig = p.size !== undefined && p.size > photoLimits.maxBytes;
      return {
        id,
        name: p.name,
        previewUri: p.previewUri,
        status: tooBig ? 'failed' : 'queued',
        progress: 0,
        attempt: 0,
        error: tooBig ? `Larger than ${photoLimits.maxBytes / (1024 * 1024)} MB; export a smaller copy.` : undefined,
      };
    });
    this.items = [...this.items, ...added];
    for (const l of this.listeners) l();
    this.pump();
  }

  /** Starts queued files while fewer than PARALLEL are on the wire. */
  private pump() {
    for (const item of this.items) {
      if (this.running.size >= PARALLEL) return;
      if (item.status === 'queued') this.start(item.id);
    }
  }

  private start(id: string) {
    const picked = this.files.get(id);
    const item = this.items.find((i) => i.id === id);
    if (!picked || !item) return;
    const attempt = item.attempt + 1;
    this.set(id, { status: 'uploading', progress: 0, attempt, error: undefined, retryAt: undefined });
    const { done, abort } = send(this.entry.id, picked, (progress) => this.set(id, { progress }));
    this.running.set(id, abort);
    done
      .then((result) => {
        this.set(id, { status: 'done', progress: 1, photoId: result.photos[0]?.id });
        for (const l of this.uploadedListeners) l(result);
        this.timers.set(
          id,
          setTimeout(() => this.drop(id), DONE_SHOWN_MS),
        );
      })
      .catch((err: unknown) => {
        const e = err instanceof ApiError ? err : new ApiError(0, 'network', 'The upload failed.');
        if (e.code === 'aborted') return;
        if (transient(e) && attempt < MAX_AUTOMATIC_TRIES) {
          const delay = retryDelay(attempt);
          this.set(id, { status: 'waiting', retryAt: Date.now() + delay, error: e.message });
          this.timers.set(
            id,
            setTimeout(() => {
              this.timers.delete(id);
              this.set(id, { status: 'queued' });
              this.pump();
            }, delay),
          );
        } else {
          this.set(id, { status: 'failed', error: e.message });
        }
      })
      .finally(() => {
        this.running.delete(id);
        this.pump();
      });
  }

  cancel(id: string) {
    this.running.get(id)?.();
    this.running.delete(id);
    this.drop(id);
    this.pump();
  }

  retry(id: string) {
    const timer = this.timers.get(id);
    if (timer) clearTimeout(timer);
    this.timers.delete(id);
    this.set(id, { status: 'queued', attempt: 0, error: undefined });
    this.pump();
  }
}

const queues = new Map<string, UploadQueue>();

function queueFor(entry: Entry): UploadQueue {
  let q = queues.get(entry.id);
  if (!q) {
    q = new UploadQueue(entry);
    queues.set(entry.id, q);
  }
  return q;
}

/** The uploads of one entry: add files, watch their progress, cancel or retry each. */
export function usePhotoUploads(entry: Entry) {
  const qc = useQueryClient();
  const queue = queueFor(entry);
  const items = useSyncExternalStore(queue.subscribe, queue.snapshot, queue.snapshot);
  const { whenUploaded } = queue;
  useEffect(
    () =>
      whenUploaded(() => {
        void afterPhotosChanged(qc, { id: entry.id, diveId: entry.diveId });
      }),
    [whenUploaded, qc, entry.id, entry.diveId],
  );
  return {
    items,
    add: (files: PickedFile[]) => queue.add(files),
    cancel: (id: string) => queue.cancel(id),
    retry: (id: string) => queue.retry(id),
  };
}
