import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useSyncExternalStore } from 'react';
import { z } from 'zod';

import { defaultSpacingCm } from '@/lib/laser-scale';
import { measurementListSchema, measurementSchema, type MeasurementCreate } from '@/lib/schemas';
import { request } from './api';
import { afterPhotosChanged } from './cache-effects';
import { measurementKeys } from './query-keys';
import { storage } from './storage';

export { measurementKeys };

export const usePhotoMeasurements = (photoId: string | undefined, enabled = true) =>
  useQuery({
    queryKey: measurementKeys.photo(photoId ?? ''),
    queryFn: ({ signal }) => request(`/api/photos/${encodeURIComponent(photoId ?? '')}/measurements`, measurementListSchema, { signal }),
    enabled: !!photoId && enabled,
  });

export const useEntryMeasurements = (observationId: string) =>
  useQuery({
    queryKey: measurementKeys.entry(observationId),
    queryFn: ({ signal }) =>
      request(`/api/observations/${encodeURIComponent(observationId)}/measurements`, measurementListSchema, { signal }),
  });

/** After a measurement is made or removed: the lists, and the entry (a length may have become its size). */
function useMeasurementsChanged(observation: { id: string; diveId: string }) {
  const qc = useQueryClient();
  return () => Promise.all([qc.invalidateQueries({ queryKey: measurementKeys.root }), afterPhotosChanged(qc, observation)]);
}

export function useCreateMeasurement(observation: { id: string; diveId: string }) {
  const changed = useMeasurementsChanged(observation);
  return useMutation({
    mutationFn: ({ photoId, ...body }: MeasurementCreate & { photoId: string }) =>
      request(`/api/photos/${encodeURIComponent(photoId)}/measurements`, measurementSchema, { method: 'POST', body }),
    onSuccess: () => changed(),
  });
}

export function useRetireMeasurement(observation: { id: string; diveId: string }) {
  const changed = useMeasurementsChanged(observation);
  return useMutation({
    mutationFn: (id: string) => request(`/api/measurements/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' }),
    onSuccess: () => changed(),
  });
}

/* ---- the laser spacing last used on this device ---- */

const SPACING_KEY = 'bathynote.measure.spacing-cm';
const listeners = new Set<() => void>();

const readSpacing = (): number => {
  const kept = Number(storage.get(SPACING_KEY));
  return kept > 0 && Number.isFinite(kept) ? kept : defaultSpacingCm;
};

/**
 * The laser spacing last used on this device, or 10 cm: offered when the dive has no spacing of its
 * own. Vehicles differ, so it is always shown and can be changed before measuring.
 */
export function useLastSpacing(): [number, (cm: number) => void] {
  const value = useSyncExternalStore(
    (l) => {
      listeners.add(l);
      return () => listeners.delete(l);
    },
    readSpacing,
    () => defaultSpacingCm,
  );
  const set = (cm: number) => {
    storage.set(SPACING_KEY, String(cm));
    for (const l of listeners) l();
  };
  return [value, set];
}
