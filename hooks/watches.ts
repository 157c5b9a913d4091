/** The campaign's watch plan and its handover notes. */
import { z } from 'zod';

import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import { handoverListSchema, handoverSchema, watchPlanSchema, type WatchPlanUpdate } from '@/lib/schemas';

import { request } from './api';
import { watchKeys } from './query-keys';

const enc = encodeURIComponent;

export const watchPlanQuery = (campaignId: string) =>
  queryOptions({
    queryKey: watchKeys.plan(campaignId),
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/watches`, watchPlanSchema),
    // Who is on watch changes with the clock, not only with the plan.
    refetchInterval: 60_000,
  });

export const handoversQuery = (campaignId: string) =>
  queryOptions({
    queryKey: watchKeys.handovers(campaignId),
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/handovers?limit=50`, handoverListSchema),
    refetchInterval: 60_000,
  });

export const useWatchPlan = (campaignId: string | undefined) => useQuery({ ...watchPlanQuery(campaignId ?? ''), enabled: !!campaignId });
export const useHandovers = (campaignId: string | undefined) => useQuery({ ...handoversQuery(campaignId ?? ''), enabled: !!campaignId });

export function useSetWatchPlan(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: WatchPlanUpdate) => request(`/api/campaigns/${enc(campaignId)}/watches`, watchPlanSchema, { method: 'PUT', body }),
    onSuccess: (plan) => qc.setQueryData(watchKeys.plan(campaignId), plan),
  });
}

export function useAcknowledgeHandover(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (handoverId: string) => request(`/api/handovers/${enc(handoverId)}/acknowledge`, handoverSchema, { method: 'POST' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: watchKeys.handovers(campaignId) }),
  });
}

/** A lead mails a note again to its incoming watch. */
export function useMailHandover() {
  return useMutation({
    mutationFn: (handoverId: string) =>
      request(`/api/handovers/${enc(handoverId)}/mail`, z.object({ queued: z.number() }), { method: 'POST' }),
  });
}
