/**
 * The entry form's typed values and how they become a request: a create body for a new entry, and
 * for an edit only the fields that changed since the version the edit started from. Pure, so the
 * mapping is tested without a screen.
 */
import { isUnderWay } from '@/lib/dive-window';
import { parseUtcInput, toUtcInput, toUtcInputExact } from '@/lib/format';
import {
  observationCreateSchema,
  type Dive,
  type Observation,
  type ObservationCreate,
  type ObservationKind,
  type ObservationUpdate,
} from '@/lib/schemas';

export type Draft = {
  kind?: ObservationKind;
  title: string;
  time: string;
  depth: string;
  /** Decimal degrees, as typed; both or neither. */
  lat: string;
  lon: string;
  temperature: string;
  note: string;
  tags: string[];
};
export type FormErrors = Partial<
  Record<'kind' | 'title' | 'observedAt' | 'depth' | 'lat' | 'lon' | 'temperature' | 'note' | 'tags' | 'form', string>
>;

/**
 * A new entry's form. The time is "now" only while the dive is under way (launched, not yet on
 * deck): on a dive that ended, or has not begun, "now" would be a wrong time that looks right, so
 * the field starts empty and the form shows the dive's window instead.
 */
export const blankDraft = (dive?: Pick<Dive, 'phases'>, now = Date.now()): Draft => ({
  title: '',
  time: dive && isUnderWay(dive, now) ? toUtcInput(new Date(now).toISOString()) : '',
  depth: '',
  lat: '',
  lon: '',
  temperature: '',
  note: '',
  tags: [],
});

const shownNumber = (value: number | null) => (value == null ? '' : String(value));

/**
 * What the form shows for an existing entry: every value it has, typed or from the telemetry log
 * (the form says which). An edit sends only what was changed, so a value from telemetry left as
 * it is stays linked to the log; a cleared one falls back to the log.
 */
export function draftFromObservation(o: Observation): Draft {
  return {
    kind: o.kind,
    title: o.title,
    time: toUtcInputExact(o.observedAt),
    depth: shownNumber(o.depth),
    lat: shownNumber(o.lat),
    lon: shownNumber(o.lon),
    temperature: shownNumber(o.temperature),
    note: o.note,
    tags: o.tags,
  };
}

/** The form field each error belongs to. */
const fieldOfError: Partial<Record<keyof FormErrors, keyof Draft>> = { observedAt: 'time' };

/**
 * The errors still to show after the form changed: an error of a field that was changed goes
 * as soon as the field reads well (or takes the new message while it still does not); the others stay.
 */
export function errorsAfterChange(shown: FormErrors, changed: readonly (keyof Draft)[], next: Draft): FormErrors {
  const fresh = toPayload(next);
  const now = fresh.ok ? {} : fresh.errors;
  const out: FormErrors = {};
  for (const key of Object.keys(shown) as (keyof FormErrors)[]) {
    const field = fieldOfError[key] ?? (key as keyof Draft);
    const touched = changed.includes(field) || (key === 'lon' && changed.includes('lat')) || (key === 'lat' && changed.includes('lon'));
    if (!touched) out[key] = shown[key];
    else if (now[key]) out[key] = now[key];
  }
  return out;
}

/** A typed number (a decimal comma is read as a point): null when empty, NaN when not a number. */
export function readNumber(text: string): number | null {
  const t = text.trim().replace(',', '.');
  return t === '' ? null : /^[-+]?(\d+\.?\d*|\.\d+)$/.test(t) ? Number(t) : NaN;
}

/** Turns the typed form into a create body, with the contract's own field messages. */
export function toPayload(d: Draft): { ok: true; body: ObservationCreate & { observedAt: string } } | { ok: false; errors: FormErrors } {
  const errors: FormErrors = {};
  const observedAt = parseUtcInput(d.time);
  if (!observedAt) errors.observedAt = 'Type a UTC time like 2026-05-14 21:14:07';
  const depth = readNumber(d.depth);
  const lat = readNumber(d.lat);
  const lon = readNumber(d.lon);
  const temperature = readNumber(d.temperature);
  if (Number.isNaN(depth)) errors.depth = 'Depth is a number of metres';
  if (Number.isNaN(lat)) errors.lat = 'Latitude in decimal degrees, e.g. 36.1452 (south is negative)';
  if (Number.isNaN(lon)) errors.lon = 'Longitude in decimal degrees, e.g. -7.4318 (west is negative)';
  if (Number.isNaN(temperature)) errors.temperature = 'Temperature is a number of °C';
  const valid = (n: number | null) => (n !== null && Number.isFinite(n) ? n : null);
  // A position with an unreadable half is sent as neither, so only that half's message shows.
  const positionBroken = Number.isNaN(lat) || Number.isNaN(lon);
  if (!d.kind) errors.kind = 'Choose what kind of observation this is';
  const parsed = observationCreateSchema.safeParse({
    kind: d.kind,
    title: d.title,
    note: d.note,
    observedAt: observedAt ?? undefined,
    depth: valid(depth),
    // A half-typed position is left to the contract's own "both or neither" rule.
    lat: positionBroken ? null : lat,
    lon: positionBroken ? null : lon,
    temperature: valid(temperature),
    tags: d.tags,
  });
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const key = String(issue.path[0] ?? 'form') as keyof FormErrors;
      errors[key] ??= issue.message;
    }
  }
  if (Object.keys(errors).length > 0 || !parsed.success || !observedAt) return { ok: false, errors };
  return { ok: true, body: { ...parsed.data, observedAt } };
}

export const draftLabels: Record<keyof Draft, string> = {
  kind: 'Kind',
  title: 'Title',
  time: 'Time (UTC)',
  depth: 'Depth (m)',
  lat: 'Latitude',
  lon: 'Longitude',
  temperature: 'Water temperature (°C)',
  note: 'Note',
  tags: 'Tags',
};

/** The fields where two versions of the form differ. */
export function differing(a: Draft, b: Draft): (keyof Draft)[] {
  return (Object.keys(draftLabels) as (keyof Draft)[]).filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k]));
}

/** The edit body: only what changed against the version the edit started from. */
export function changes(draft: Draft, base: Observation, version: number): ObservationUpdate | FormErrors {
  const result = toPayload(draft);
  if (!result.ok) return result.errors;
  const from = draftFromObservation(base);
  const body: ObservationUpdate = { version };
  const changed = differing(draft, from);
  if (changed.includes('kind')) body.kind = result.body.kind;
  if (changed.includes('title')) body.title = result.body.title;
  if (changed.includes('time')) body.observedAt = result.body.observedAt;
  if (changed.includes('depth')) body.depth = result.body.depth ?? null;
  // The contract takes a position as a pair: a change to either half sends both.
  if (changed.includes('lat') || changed.includes('lon')) {
    body.lat = result.body.lat ?? null;
    body.lon = result.body.lon ?? null;
  }
  if (changed.includes('temperature')) body.temperature = result.body.temperature ?? null;
  if (changed.includes('note')) body.note = result.body.note ?? '';
  if (changed.includes('tags')) body.tags = result.body.tags ?? [];
  return body;
}

/** The form's fields as the merge weighs them: a position is one value, never half of each person's. */
const mergeUnits: (keyof Draft)[][] = [['kind'], ['title'], ['time'], ['depth'], ['lat', 'lon'], ['temperature'], ['note'], ['tags']];

const same = (a: Draft, b: Draft, unit: (keyof Draft)[]) => unit.every((k) => JSON.stringify(a[k]) === JSON.stringify(b[k]));

/**
 * A three-way merge of an edit with someone else's save: `base` is the entry as the edit began,
 * `theirs` as it is now. What only one side changed is taken from that side; what both changed
 * to different values is a clash for the editor to choose (`merged` holds theirs there until then).
 * Without a base (a draft kept by an earlier version of the app), every difference is a clash.
 */
export function mergeEdit(base: Draft | undefined, theirs: Draft, mine: Draft): { merged: Draft; clashes: (keyof Draft)[] } {
  const merged: Draft = { ...theirs };
  const clashes: (keyof Draft)[] = [];
  for (const unit of mergeUnits) {
    const mineChanged = !base || !same(mine, base, unit);
    const theirsChanged = !base || !same(theirs, base, unit);
    if (mineChanged && !theirsChanged) for (const k of unit) Object.assign(merged, { [k]: mine[k] });
    if (mineChanged && theirsChanged && !same(mine, theirs, unit)) clashes.push(...unit);
  }
  return { merged, clashes };
}

/** The merged edit once the editor has chosen each clash: their value where they chose theirs, else their own. */
export function resolveClashes(merged: Draft, mine: Draft, clashes: (keyof Draft)[], takeTheirs: ReadonlySet<keyof Draft>): Draft {
  const out: Draft = { ...merged };
  for (const k of clashes) if (!takeTheirs.has(k)) Object.assign(out, { [k]: mine[k] });
  return out;
}
