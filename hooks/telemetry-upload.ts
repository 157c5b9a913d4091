/**
 * Sending a telemetry log by XMLHttpRequest, whose upload events give a real progress figure
 * (fetch gives none). The answer is parsed with the same schema the server answers with, and a
 * failure becomes the client's one `ApiError`.
 */
import { apiErrorSchema, telemetryImportReportSchema, type TelemetryImportFields, type TelemetryImportReport } from '@/lib/schemas';
import { apiUrl, ApiError } from './api';

/** Bytes sent so far; once all are sent the server is reading the log and stamping entries. */
export type UploadProgress = { sent: number; total: number; phase: 'sending' | 'reading' };

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

export function uploadTelemetryLog(
  diveId: string,
  file: Blob,
  fileName: string,
  fields: TelemetryImportFields,
  onProgress: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<TelemetryImportReport> {
  return new Promise((resolve, reject) => {
    const form = new FormData();
    // Options first, so the server has them before the file's bytes arrive.
    for (const [key, value] of Object.entries(fields)) if (value !== undefined) form.append(key, String(value));
    form.append('file', file, fileName);

    const xhr = new XMLHttpRequest();
    xhr.open('POST', apiUrl(`/api/dives/${encodeURIComponent(diveId)}/telemetry`));
    xhr.withCredentials = true;
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      const total = e.lengthComputable ? e.total : file.size;
      onProgress({ sent: e.loaded, total, phase: e.loaded >= total ? 'reading' : 'sending' });
    };
    xhr.upload.onload = () => onProgress({ sent: file.size, total: file.size, phase: 'reading' });
    xhr.onload = () => {
      const json = parseJson(xhr.responseText);
      if (xhr.status >= 200 && xhr.status < 300) {
        const report = telemetryImportReportSchema.safeParse(json);
        if (report.success) resolve(report.data);
        else reject(new ApiError(xhr.status, 'bad_response', 'The server sent an answer this app does not understand. Reload the page.'));
        return;
      }
      const error = apiErrorSchema.safeParse(json);
      reject(
        error.success
          ? new ApiError(xhr.status, error.data.error.code, error.data.error.message, error.data.error.issues ?? [])
          : new ApiError(xhr.status, 'http_error', `The server answered ${xhr.status}.`),
      );
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload was cut off: no connection to the ship’s server. Try again.'));
    xhr.onabort = () => reject(new ApiError(0, 'aborted', 'The upload was stopped.'));
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}
