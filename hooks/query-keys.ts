/**
 * Every cached query's key, in one file that imports nothing: the resource hooks, the cache
 * effects and the live stream all name the same key objects, and none of them has to import
 * another resource's file (and its mutations) to reach a key.
 */

export type DiveLogFilters = {
  kind?: string;
  tag?: string;
  author?: string;
  hasPhotos?: 'true' | 'false';
  verification?: string;
  /** Only the retired entries, which the server shows to leads alone. */
  retired?: 'only';
  sort?: 'time' | 'depth' | 'kind' | 'author';
  order?: 'asc' | 'desc';
};

export type GalleryFilters = { kind?: string; tag?: string };

export const sessionKeys = { root: ['session'] as const, me: () => [...sessionKeys.root, 'me'] as const };

export const campaignKeys = {
  root: ['campaigns'] as const,
  list: () => [...campaignKeys.root, 'list'] as const,
  detail: (id: string) => [...campaignKeys.root, 'detail', id] as const,
  dives: (id: string) => [...campaignKeys.root, 'detail', id, 'dives'] as const,
  tags: (id: string) => [...campaignKeys.root, 'detail', id, 'tags'] as const,
  members: (id: string) => [...campaignKeys.root, 'detail', id, 'members'] as const,
  quickMarks: (id: string) => [...campaignKeys.root, 'detail', id, 'quick-marks'] as const,
  nextFindNumber: (id: string) => [...campaignKeys.root, 'detail', id, 'next-find-number'] as const,
};

export const diveKeys = {
  root: ['dives'] as const,
  detail: (id: string) => [...diveKeys.root, id] as const,
};

export const observationKeys = {
  root: ['observations'] as const,
  diveLogs: (diveId: string) => [...observationKeys.root, 'dive-log', diveId] as const,
  diveLog: (diveId: string, filters: DiveLogFilters = {}) => [...observationKeys.diveLogs(diveId), filters] as const,
  detail: (id: string) => [...observationKeys.root, 'detail', id] as const,
  revisions: (id: string) => [...observationKeys.root, 'detail', id, 'revisions'] as const,
};

export const photoKeys = {
  root: ['photos'] as const,
  gallery: (diveId: string, filters: GalleryFilters) =>
    [...photoKeys.root, 'gallery', diveId, { kind: filters.kind ?? null, tag: filters.tag ?? null }] as const,
  galleries: (diveId: string) => [...photoKeys.root, 'gallery', diveId] as const,
};

export const measurementKeys = {
  root: ['measurements'] as const,
  photo: (photoId: string) => [...measurementKeys.root, 'photo', photoId] as const,
  entry: (observationId: string) => [...measurementKeys.root, 'entry', observationId] as const,
};

export const telemetryKeys = {
  root: ['telemetry'] as const,
  dive: (diveId: string) => [...telemetryKeys.root, diveId] as const,
  samples: (diveId: string, points: number) => [...telemetryKeys.dive(diveId), 'samples', points] as const,
  summary: (diveId: string) => [...telemetryKeys.dive(diveId), 'summary'] as const,
  at: (diveId: string, t: string) => [...telemetryKeys.dive(diveId), 'at', t] as const,
};

/** Search filters as they stand in the URL: every value a string. */
export type SearchFilters = {
  campaignId?: string;
  diveId?: string;
  kind?: string;
  tag?: string;
  author?: string;
  hasPhotos?: 'true' | 'false';
  verification?: string;
  minDepth?: string;
  maxDepth?: string;
  from?: string;
  to?: string;
};

export const searchKeys = {
  root: ['search'] as const,
  results: (q: string, filters: SearchFilters) => [...searchKeys.root, q, filters] as const,
};

export const taxaKeys = {
  root: ['taxa'] as const,
  campaign: (campaignId: string, sort: string) => [...taxaKeys.root, 'campaign', campaignId, sort] as const,
  dive: (diveId: string, sort: string) => [...taxaKeys.root, 'dive', diveId, sort] as const,
  names: (campaignId: string, q: string) => [...taxaKeys.root, 'names', campaignId, q] as const,
  checklist: (campaignId: string) => [...taxaKeys.root, 'checklist', campaignId] as const,
  substrates: (campaignId: string) => [...taxaKeys.root, 'substrates', campaignId] as const,
};

export const watchKeys = {
  root: ['watches'] as const,
  plan: (campaignId: string) => [...watchKeys.root, 'plan', campaignId] as const,
  handovers: (campaignId: string) => [...watchKeys.root, 'handovers', campaignId] as const,
};

/** A report is always made afresh from the record: nothing else reads or changes it. */
export const reportKeys = {
  root: ['reports'] as const,
  dive: (diveId: string) => [...reportKeys.root, 'dive', diveId] as const,
  day: (campaignId: string, date: string) => [...reportKeys.root, 'day', campaignId, date] as const,
};
