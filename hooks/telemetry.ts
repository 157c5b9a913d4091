import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useRef, useState } from 'react';

import { diveSummarySchema, telemetryAtSchema, telemetrySamplesSchema, type TelemetryImportFields } from '@/lib/schemas';
import { request } from './api';
import { afterTelemetryImported } from './cache-effects';
import { telemetryKeys } from './query-keys';
import { uploadTelemetryLog, type UploadProgress } from './telemetry-upload';

export { telemetryKeys };

const divePath = (diveId: string) => `/api/dives/${encodeURIComponent(diveId)}`;

/** Points a chart needs: enough for a wide screen without shipping the whole log. */
export const CHART_POINTS = 1000;

export const telemetryQuery = (diveId: string, points = CHART_POINTS) =>
  queryOptions({
    queryKey: telemetryKeys.samples(diveId, points),
    queryFn: ({ signal }) => request(`${divePath(diveId)}/telemetry?points=${points}`, telemetrySamplesSchema, { signal }),
  });

export const diveSummaryQuery = (diveId: string) =>
  queryOptions({
    queryKey: telemetryKeys.summary(diveId),
    queryFn: ({ signal }) => request(`${divePath(diveId)}/summary`, diveSummarySchema, { signal }),
  });

export const telemetryAtQuery = (diveId: string, t: string) =>
  queryOptions({
    queryKey: telemetryKeys.at(diveId, t),
    queryFn: ({ signal }) => request(`${divePath(diveId)}/at?t=${encodeURIComponent(t)}`, telemetryAtSchema, { signal }),
    staleTime: 60_000,
  });

export const useTelemetry = (diveId: string | undefined) => useQuery({ ...telemetryQuery(diveId ?? ''), enabled: !!diveId });
export const useDiveSummary = (diveId: string | undefined) => useQuery({ ...diveSummaryQuery(diveId ?? ''), enabled: !!diveId });

/** The log's values at an instant the reader picked; the last answer stays while the next loads. */
export const useTelemetryAt = (diveId: string, t: string | null) =>
  useQuery({ ...telemetryAtQuery(diveId, t ?? ''), enabled: !!t, placeholderData: keepPreviousData });

export type ImportInput = { file: Blob; fileName: string; fields: TelemetryImportFields };

/**
 * Uploads a log with a real progress figure. Afterwards the dive's charts and every entry view
 * are refreshed, since the import re-stamps the dive's entries.
 */
export function useImportTelemetry(diveId: string) {
  const qc = useQueryClient();
  const [progress, setProgress] = useState<UploadProgress | null>(null);
  const controller = useRef<AbortController | null>(null);
  const mutation = useMutation({
    mutationFn: (input: ImportInput) => {
      controller.current = new AbortController();
      return uploadTelemetryLog(diveId, input.file, input.fileName, input.fields, setProgress, controller.current.signal);
    },
    onSettled: () => {
      controller.current = null;
      setProgress(null);
    },
    onSuccess: () => afterTelemetryImported(qc, diveId),
  });
  const { reset: resetMutation } = mutation;
  const reset = useCallback(() => {
    setProgress(null);
    resetMutation();
  }, [resetMutation]);
  const cancel = useCallback(() => controller.current?.abort(), []);
  return { ...mutation, progress, reset, cancel };
}
