/** The daily dive report: one dive's, or a day's across its dives. */
import { queryOptions, useQuery } from '@tanstack/react-query';

import { reportSchema } from '@/lib/schemas';
import { request } from './api';

const enc = encodeURIComponent;

/** Kept beside the report's hooks: nothing else reads or changes a report, it is always made afresh from the record. */
export const reportKeys = {
  root: ['reports'] as const,
  dive: (diveId: string) => [...reportKeys.root, 'dive', diveId] as const,
  day: (campaignId: string, date: string) => [...reportKeys.root, 'day', campaignId, date] as const,
};

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
