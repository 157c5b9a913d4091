import { infiniteQueryOptions, useInfiniteQuery, useMutation, useQueryClient } from '@tanstack/react-query';
import { useSyncExternalStore } from 'react';
import { z } from 'zod';

import {
  galleryPageSchema,
  observationSchema,
  photoSchema,
  type GalleryQuery,
  type ObservationDetail,
  type Photo,
  type PhotoUpdate,
} from '@/lib/schemas';
import { apiUrl, request } from './api';
import { afterPhotosChanged } from './cache-effects';
import { photoKeys } from './query-keys';
import { storage } from './storage';

export { photoKeys };

/** The address of one size of a photo, for an image element. */
export const photoUrl = (photo: Pick<Photo, 'urls'>, size: keyof Photo['urls']) => apiUrl(photo.urls[size]);

export const galleryQuery = (diveId: string, filters: Pick<GalleryQuery, 'kind' | 'tag'>) =>
  infiniteQueryOptions({
    queryKey: photoKeys.gallery(diveId, filters),
    queryFn: ({ pageParam, signal }) => {
      const params = new URLSearchParams({ limit: '60' });
      if (filters.kind) params.set('kind', filters.kind);
      if (filters.tag) params.set('tag', filters.tag);
      if (pageParam) params.set('cursor', pageParam);
      return request(`/api/dives/${encodeURIComponent(diveId)}/photos?${params.toString()}`, galleryPageSchema, { signal });
    },
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });

export const useGallery = (diveId: string | undefined, filters: Pick<GalleryQuery, 'kind' | 'tag'>) =>
  useInfiniteQuery({ ...galleryQuery(diveId ?? '', filters), enabled: !!diveId });

/** After any change to an entry's photos made here. */
export function usePhotosChanged() {
  const qc = useQueryClient();
  return (observation: Pick<ObservationDetail, 'id' | 'diveId'>) => afterPhotosChanged(qc, observation);
}

export function useUpdatePhoto(observation: Pick<ObservationDetail, 'id' | 'diveId'>) {
  const changed = usePhotosChanged();
  return useMutation({
    mutationFn: ({ id, ...body }: PhotoUpdate & { id: string }) =>
      request(`/api/photos/${encodeURIComponent(id)}`, photoSchema, { method: 'PATCH', body }),
    onSuccess: () => changed(observation),
  });
}

export function useRetirePhoto(observation: Pick<ObservationDetail, 'id' | 'diveId'>) {
  const changed = usePhotosChanged();
  return useMutation({
    mutationFn: (id: string) => request(`/api/photos/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' }),
    onSuccess: () => changed(observation),
  });
}

/**
 * Sets the entry's time to a photo's capture time. The edit carries the version the reader
 * has, so a change made meanwhile by someone else is refused (409) rather than overwritten.
 */
export function useTakeTimeFromPhoto(observation: Pick<ObservationDetail, 'id' | 'diveId' | 'campaignId' | 'version'>) {
  const changed = usePhotosChanged();
  return useMutation({
    mutationFn: (capturedAt: string) =>
      request(`/api/observations/${encodeURIComponent(observation.id)}`, observationSchema, {
        method: 'PATCH',
        body: { observedAt: capturedAt, version: observation.version },
      }),
    onSettled: () => changed(observation),
  });
}

/* ---- the low-bandwidth setting ---- */

const THUMBNAILS_ONLY_KEY = 'bathynote.photos.thumbnails-only';
const listeners = new Set<() => void>();

const readThumbnailsOnly = () => storage.get(THUMBNAILS_ONLY_KEY) === '1';

export function setThumbnailsOnly(on: boolean) {
  storage.set(THUMBNAILS_ONLY_KEY, on ? '1' : '0');
  for (const l of listeners) l();
}

/**
 * "Thumbnails only", for a thin satellite link: photos stay at thumbnail size until the reader
 * asks for the full image. Kept on this device.
 */
export function useThumbnailsOnly(): [boolean, (on: boolean) => void] {
  const on = useSyncExternalStore(
    (l) => {
      listeners.add(l);
      return () => listeners.delete(l);
    },
    readThumbnailsOnly,
    () => false,
  );
  return [on, setThumbnailsOnly];
}
