/**
 * The biology record's vocabulary and summaries: the taxa a dive or campaign saw, name
 * suggestions, the species list and its import, and the substrate classes.
 */
import { z } from 'zod';

import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import {
  checklistReportSchema,
  checklistSchema,
  nameSuggestionListSchema,
  observationDetailSchema,
  sampleListSchema,
  substrateClassSchema,
  substrateListSchema,
  taxaListSchema,
  type SampleInput,
  type taxaSorts,
} from '@/lib/schemas';
import { request, upload } from './api';
import { afterEntryChanged } from './cache-effects';
import { observationKeys, taxaKeys } from './query-keys';

export type TaxaSort = (typeof taxaSorts)[number];

const enc = encodeURIComponent;

export const taxaQuery = (scope: { campaignId: string } | { diveId: string }, sort: TaxaSort) =>
  queryOptions({
    queryKey: 'diveId' in scope ? taxaKeys.dive(scope.diveId, sort) : taxaKeys.campaign(scope.campaignId, sort),
    queryFn: () =>
      request(
        'diveId' in scope
          ? `/api/dives/${enc(scope.diveId)}/taxa?sort=${sort}`
          : `/api/campaigns/${enc(scope.campaignId)}/taxa?sort=${sort}`,
        taxaListSchema,
      ),
    placeholderData: keepPreviousData,
  });

export const useTaxa = (scope: { campaignId: string } | { diveId: string }, sort: TaxaSort) => useQuery(taxaQuery(scope, sort));

/** Names to offer while a name is typed; an empty box asks for nothing. */
export const useNameSuggestions = (campaignId: string, q: string) =>
  useQuery({
    queryKey: taxaKeys.names(campaignId, q),
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/names?q=${enc(q)}&limit=8`, nameSuggestionListSchema),
    enabled: q.trim().length >= 2,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });

export const useChecklist = (campaignId: string) =>
  useQuery({
    queryKey: taxaKeys.checklist(campaignId),
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/checklist`, checklistSchema),
  });

export function useImportChecklist(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ file, name }: { file: Blob; name: string }) => {
      const form = new FormData();
      form.append('file', file, name);
      return upload(`/api/campaigns/${enc(campaignId)}/checklist`, checklistReportSchema, form);
    },
    onSuccess: () => void qc.invalidateQueries({ queryKey: taxaKeys.root }),
  });
}

export const useSubstrates = (campaignId: string) =>
  useQuery({
    queryKey: taxaKeys.substrates(campaignId),
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/substrates`, substrateListSchema),
    staleTime: 60_000,
  });

export function useAddSubstrate(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (name: string) => request(`/api/campaigns/${enc(campaignId)}/substrates`, substrateClassSchema, { body: { name } }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: taxaKeys.substrates(campaignId) }),
  });
}

export function useChangeSubstrate(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: { id: string; name?: string; retired?: boolean }) =>
      request(`/api/substrates/${enc(id)}`, substrateClassSchema, { method: 'PATCH', body }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: taxaKeys.substrates(campaignId) });
      // A rename shows on every entry that has the class.
      void qc.invalidateQueries({ queryKey: observationKeys.root });
    },
  });
}

export function useSetSample(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SampleInput) =>
      request(`/api/observations/${enc(id)}/sample`, observationDetailSchema, { method: 'PUT', body: input }),
    onSuccess: (detail) => {
      qc.setQueryData(observationKeys.detail(id), detail);
      afterEntryChanged(qc, detail);
    },
  });
}

export const useSampleRegister = (scope: { campaignId: string } | { diveId: string }) =>
  useQuery({
    queryKey: [...taxaKeys.root, 'samples', scope],
    queryFn: () =>
      request(
        'diveId' in scope ? `/api/dives/${enc(scope.diveId)}/samples` : `/api/campaigns/${enc(scope.campaignId)}/samples`,
        sampleListSchema,
      ),
  });

export const useNextSampleNumber = (campaignId: string, enabled: boolean) =>
  useQuery({
    queryKey: [...taxaKeys.root, 'next-sample', campaignId],
    queryFn: () => request(`/api/campaigns/${enc(campaignId)}/samples/next-number`, z.object({ sampleNumber: z.string() })),
    enabled,
    staleTime: 0,
  });
