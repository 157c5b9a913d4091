/**
 * Sending a telemetry log through the API client's upload, whose progress events give a real
 * figure for a large log on a thin link.
 */
import { telemetryImportReportSchema, type TelemetryImportFields, type TelemetryImportReport } from '@/lib/schemas';
import { upload } from './api';

/** Bytes sent so far; once all are sent the server is reading the log and stamping entries. */
export type UploadProgress = { sent: number; total: number; phase: 'sending' | 'reading' };

export function uploadTelemetryLog(
  diveId: string,
  file: Blob,
  fileName: string,
  fields: TelemetryImportFields,
  onProgress: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<TelemetryImportReport> {
  const form = new FormData();
  // Options first, so the server has them before the file's bytes arrive.
  for (const [key, value] of Object.entries(fields)) if (value !== undefined) form.append(key, String(value));
  form.append('file', file, fileName);
  return upload(`/api/dives/${encodeURIComponent(diveId)}/telemetry`, telemetryImportReportSchema, form, {
    signal,
    onProgress: (sent, total = file.size) => onProgress({ sent, total, phase: sent >= total ? 'reading' : 'sending' }),
    onSent: () => onProgress({ sent: file.size, total: file.size, phase: 'reading' }),
  });
}
