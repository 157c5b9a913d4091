/** A member's digest subscription for a campaign, and the lead's digest log and "send now". */
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  digestLogItemSchema,
  digestSendResultSchema,
  subscriptionSchema,
  unsubscribeResultSchema,
  type DigestSend,
  type SubscriptionUpdate,
} from '@/lib/schemas';
import { request } from './api';
import { campaignKeys } from './query-keys';

const path = (campaignId: string) => `/api/campaigns/${encodeURIComponent(campaignId)}`;

export const digestKeys = {
  subscription: (campaignId: string) => [...campaignKeys.detail(campaignId), 'subscription'] as const,
  log: (campaignId: string) => [...campaignKeys.detail(campaignId), 'digests'] as const,
};

export const subscriptionQuery = (campaignId: string) =>
  queryOptions({
    queryKey: digestKeys.subscription(campaignId),
    queryFn: () => request(`${path(campaignId)}/subscription`, subscriptionSchema),
  });

export const useSubscription = (campaignId: string | undefined) =>
  useQuery({ ...subscriptionQuery(campaignId ?? ''), enabled: !!campaignId });

export function useUpdateSubscription(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SubscriptionUpdate) =>
      request(`${path(campaignId)}/subscription`, subscriptionSchema, { method: 'PUT', body: input }),
    onSuccess: (subscription) => qc.setQueryData(digestKeys.subscription(campaignId), subscription),
  });
}

export const digestLogQuery = (campaignId: string) =>
  queryOptions({
    queryKey: digestKeys.log(campaignId),
    queryFn: () => request(`${path(campaignId)}/digests`, z.array(digestLogItemSchema)),
  });

/**
 * Only a lead may read the log. While a digest's mail is still on its way the log is asked again
 * every few seconds, to show it sent or failed.
 */
export const useDigestLog = (campaignId: string | undefined, isLead: boolean) =>
  useQuery({
    ...digestLogQuery(campaignId ?? ''),
    enabled: !!campaignId && isLead,
    refetchInterval: (q) => (q.state.data?.some((d) => d.mail?.state === 'queued' || d.mail?.state === 'sending') ? 4000 : false),
  });

export function useSendDigestNow(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: DigestSend) => request(`${path(campaignId)}/digests`, digestSendResultSchema, { body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: digestKeys.log(campaignId) }),
  });
}

/** The one-click unsubscribe a digest's link opens; it needs no sign-in. */
export function useUnsubscribe() {
  return useMutation({
    mutationFn: (token: string) => request(`/api/unsubscribe/${encodeURIComponent(token)}`, unsubscribeResultSchema, { body: {} }),
  });
}
