import { queryOptions, useQuery } from '@tanstack/react-query';

import { diveSchema } from '@/lib/schemas';
import { request } from './api';

export const diveKeys = {
  root: ['dives'] as const,
  detail: (id: string) => [...diveKeys.root, id] as const,
};

export const diveQuery = (id: string) =>
  queryOptions({ queryKey: diveKeys.detail(id), queryFn: () => request(`/api/dives/${encodeURIComponent(id)}`, diveSchema) });

export const useDive = (id: string | undefined) => useQuery({ ...diveQuery(id ?? ''), enabled: !!id });
