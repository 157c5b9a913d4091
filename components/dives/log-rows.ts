import type { Dive, Observation } from '@/lib/schemas';

import { phaseLabels } from '@/lib/dive-phases';

export type LogRow =
  | { type: 'entry'; key: string; observation: Observation }
  | { type: 'phase'; key: string; phase: keyof Dive['phases']; label: string; at: string };

/** Whether an entry's title or note contains the typed text, in any case. */
export function matchesSearch(o: Observation, text: string): boolean {
  const q = text.trim().toLowerCase();
  return !q || o.title.toLowerCase().includes(q) || o.note.toLowerCase().includes(q);
}

/**
 * The log's rows with the dive's phases between the entries, at their times. Only a log in time
 * order gets them, and a phase older than every loaded entry waits until the log is loaded to
 * its start, so that it never shows above entries that are not loaded yet.
 */
export function withPhases(items: Observation[], phases: Dive['phases'] | undefined, order: 'asc' | 'desc', allLoaded: boolean): LogRow[] {
  const rows: LogRow[] = items.map((o) => ({ type: 'entry', key: o.id, observation: o }));
  // An empty log shows why it is empty rather than a column of phases.
  if (!phases || items.length === 0) return rows;
  const oldestLoaded = items.reduce<string | null>((min, o) => (min === null || o.observedAt < min ? o.observedAt : min), null);
  const marks = phaseLabels
    .map(([phase, label]) => ({ phase, label, at: phases[phase] }))
    .filter((p): p is { phase: keyof Dive['phases']; label: string; at: string } => !!p.at)
    .filter((p) => allLoaded || (oldestLoaded !== null && p.at >= oldestLoaded));
  // Later in the list means older when newest-first; a phase goes before the first entry it precedes.
  const comesBefore = (phaseAt: string, entryAt: string) => (order === 'desc' ? phaseAt > entryAt : phaseAt <= entryAt);
  for (const m of [...marks].sort((a, b) => (order === 'desc' ? b.at.localeCompare(a.at) : a.at.localeCompare(b.at)))) {
    const i = rows.findIndex((r) => r.type === 'entry' && comesBefore(m.at, r.observation.observedAt));
    const row: LogRow = { type: 'phase', key: `phase-${m.phase}`, phase: m.phase, label: m.label, at: m.at };
    if (i < 0) rows.push(row);
    else rows.splice(i, 0, row);
  }
  return rows;
}
