/** The daily dive report: one dive's, or a day's across its dives. */
import { queryOptions, useQuery } from '@tanstack/react-query';

import { reportSchema } from '@/lib/schemas';
import { request } from './api';
import { reportKeys } from './query-keys';

const enc = encodeURIComponent;

export const diveReportQuery = (diveId: string) =>
  queryOptions({
    queryKey: reportKeys.dive(diveId),
    queryFn: ({ signal }) => request(`/api/dives/${enc(diveId)}/report`, reportSchema, { signal }),
  });

export const dayReportQuery = (campaignId: string, date: string) =>
  queryOptions({
    queryKey: reportKeys.day(campaignId, date),
    queryFn: ({ signal }) => request(`/api/campaigns/${enc(campaignId)}/reports/${enc(date)}`, reportSchema, { signal }),
  });

export const useDiveReport = (diveId: string | undefined) => useQuery({ ...diveReportQuery(diveId ?? ''), enabled: !!diveId });
export const useDayReport = (campaignId: string | undefined, date: string | undefined) =>
  useQuery({ ...dayReportQuery(campaignId ?? '', date ?? ''), enabled: !!campaignId && !!date });
