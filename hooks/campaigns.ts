import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import { campaignSchema, diveSchema, memberSchema, quickMarkSchema, tagSchema, type ObservationKind } from '@/lib/schemas';
import { request } from './api';
import { campaignKeys } from './query-keys';

export { campaignKeys };

export const campaignsQuery = () =>
  queryOptions({ queryKey: campaignKeys.list(), queryFn: () => request('/api/campaigns', z.array(campaignSchema)) });

export const campaignQuery = (id: string) =>
  queryOptions({ queryKey: campaignKeys.detail(id), queryFn: () => request(`/api/campaigns/${encodeURIComponent(id)}`, campaignSchema) });

export const campaignDivesQuery = (id: string) =>
  queryOptions({
    queryKey: campaignKeys.dives(id),
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(id)}/dives`, z.array(diveSchema)),
  });

export const campaignTagsQuery = (id: string) =>
  queryOptions({
    queryKey: campaignKeys.tags(id),
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(id)}/tags`, z.array(tagSchema)),
    staleTime: 5 * 60_000,
  });

export const campaignMembersQuery = (id: string) =>
  queryOptions({
    queryKey: campaignKeys.members(id),
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(id)}/members`, z.array(memberSchema)),
  });

export const useCampaigns = () => useQuery(campaignsQuery());
export const useCampaign = (id: string | undefined) => useQuery({ ...campaignQuery(id ?? ''), enabled: !!id });
export const useCampaignDives = (id: string | undefined) => useQuery({ ...campaignDivesQuery(id ?? ''), enabled: !!id });
export const useCampaignTags = (id: string | undefined) => useQuery({ ...campaignTagsQuery(id ?? ''), enabled: !!id });

export const quickMarksQuery = (id: string) =>
  queryOptions({
    queryKey: campaignKeys.quickMarks(id),
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(id)}/quick-marks`, z.array(quickMarkSchema)),
    staleTime: 5 * 60_000,
  });

export const useQuickMarks = (id: string | undefined) => useQuery({ ...quickMarksQuery(id ?? ''), enabled: !!id });

export function useCreateQuickMark(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { label: string; kind: ObservationKind; tags: string[] }) =>
      request(`/api/campaigns/${encodeURIComponent(campaignId)}/quick-marks`, quickMarkSchema, { body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: quickMarksQuery(campaignId).queryKey }),
  });
}

export function useUpdateQuickMark(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: { id: string; label: string; kind: ObservationKind; tags: string[] }) =>
      request(`/api/quick-marks/${encodeURIComponent(id)}`, quickMarkSchema, { method: 'PATCH', body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: quickMarksQuery(campaignId).queryKey }),
  });
}

export function useRetireQuickMark(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => request(`/api/quick-marks/${encodeURIComponent(id)}`, z.unknown(), { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: quickMarksQuery(campaignId).queryKey }),
  });
}

export function useCreateTag(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (name: string) => request(`/api/campaigns/${encodeURIComponent(campaignId)}/tags`, tagSchema, { body: { name } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: campaignKeys.tags(campaignId) }),
  });
}

export function useUpdateTag(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: { id: string; name?: string; retired?: boolean; mergeInto?: string }) =>
      request(`/api/tags/${encodeURIComponent(id)}`, tagSchema, { method: 'PATCH', body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: campaignKeys.tags(campaignId) }),
  });
}
