import { queryOptions, useQuery } from '@tanstack/react-query';

import { exportSummarySchema, type ExportKind } from '@/lib/schemas';
import { request } from './api';

/** The export screen's key: under the campaign's own, so a change to the campaign refreshes it too. */
export const exportKeys = {
  summary: (campaignId: string) => ['campaigns', 'detail', campaignId, 'export-summary'] as const,
};

const base = (campaignId: string) => `/api/campaigns/${encodeURIComponent(campaignId)}/export`;

/** The download path of each export. */
export const exportPaths: Record<ExportKind, (campaignId: string) => string> = {
  'darwin-core': (id) => `${base(id)}/darwin-core.zip`,
  finds: (id) => `${base(id)}/finds.csv`,
  geojson: (id) => `${base(id)}/observations.geojson`,
  csv: (id) => `${base(id)}/observations.csv`,
};

/** The path of the CSV of a filtered list: the dive log's filters, without the empty ones. */
export function listCsvPath(campaignId: string, filters: Record<string, string | undefined>): string {
  const query = new URLSearchParams();
  for (const [key, value] of Object.entries(filters)) if (value !== undefined && value !== '') query.set(key, value);
  const text = query.toString();
  return `${exportPaths.csv(campaignId)}${text ? `?${text}` : ''}`;
}

export const exportSummaryQuery = (campaignId: string) =>
  queryOptions({ queryKey: exportKeys.summary(campaignId), queryFn: () => request(`${base(campaignId)}/summary`, exportSummarySchema) });

export const useExportSummary = (campaignId: string | undefined) =>
  useQuery({ ...exportSummaryQuery(campaignId ?? ''), enabled: !!campaignId });
