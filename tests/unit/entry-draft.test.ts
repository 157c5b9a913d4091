import { describe, expect, it } from 'vitest';

import {
  blankDraft,
  changes,
  draftFromObservation,
  errorsAfterChange,
  mergeEdit,
  readNumber,
  resolveClashes,
  toPayload,
  type Draft,
} from '@/components/observations/entry-draft';
import type { Observation } from '@/lib/schemas';

const draft = (patch: Partial<Draft> = {}): Draft => ({
  kind: 'biology',
  title: 'Sponge on the stern',
  time: '2026-05-14 21:14:07',
  depth: '',
  lat: '',
  lon: '',
  temperature: '',
  note: '',
  tags: [],
  ...patch,
});

const stored: Observation = {
  id: 'obs-1',
  diveId: 'dive-1',
  campaignId: 'camp-1',
  observedAt: '2026-05-14T21:14:07.250Z',
  kind: 'biology',
  title: 'Sponge on the stern',
  note: 'Pale, about 20 cm.',
  depth: 512.4,
  depthSource: 'telemetry',
  lat: 36.1452,
  lon: -7.4318,
  positionSource: 'manual',
  temperature: 4.1,
  temperatureSource: 'telemetry',
  heading: null,
  headingSource: null,
  altitude: null,
  altitudeSource: null,
  tags: ['sponge'],
  photoCount: 0,
  identification: null,
  findNumber: null,
  outsideDive: false,
  sample: null,
  individualCount: null,
  organismQuantity: null,
  organismQuantityType: null,
  sizes: [],
  substrate: null,
  authorId: 'user-1',
  authorName: 'Cleo',
  version: 3,
  retired: false,
  createdAt: '2026-05-14T21:15:00.000Z',
  updatedAt: '2026-05-14T21:15:00.000Z',
};

describe('the time a new entry starts with', () => {
  const now = Date.parse('2026-05-13T21:14:07.250Z');
  const phases = (p: Partial<Record<'launch' | 'onBottom' | 'offBottom' | 'onDeck', string>>) => ({
    phases: { launch: null, onBottom: null, offBottom: null, onDeck: null, ...p },
  });

  it('is now, to the second, while the dive is under way (launched, not on deck)', () => {
    expect(blankDraft(phases({ launch: '2026-05-13T17:40:00.000Z' }), now).time).toBe('2026-05-13 21:14:07');
    expect(blankDraft(phases({ launch: '2026-05-13T17:40:00.000Z', onBottom: '2026-05-13T18:08:00.000Z' }), now).time).toBe(
      '2026-05-13 21:14:07',
    );
  });

  it('is empty on a dive that is back on deck, not yet launched, launched later than now, or not known', () => {
    const ended = phases({ launch: '2026-05-13T17:40:00.000Z', onDeck: '2026-05-13T20:05:00.000Z' });
    expect(blankDraft(ended, now).time).toBe('');
    expect(blankDraft(phases({}), now).time).toBe('');
    expect(blankDraft(phases({ launch: '2026-05-13T22:00:00.000Z' }), now).time).toBe('');
    expect(blankDraft(undefined, now).time).toBe('');
  });

  it('leaves every other field empty', () => {
    expect(blankDraft(phases({ launch: '2026-05-13T17:40:00.000Z' }), now)).toEqual({
      title: '',
      time: '2026-05-13 21:14:07',
      depth: '',
      lat: '',
      lon: '',
      temperature: '',
      note: '',
      tags: [],
    });
  });
});

describe('a new entry from the form', () => {
  it('reads the typed time as UTC and leaves empty numbers to the telemetry log', () => {
    const result = toPayload(draft());
    expect(result).toEqual({
      ok: true,
      body: {
        kind: 'biology',
        title: 'Sponge on the stern',
        note: '',
        observedAt: '2026-05-14T21:14:07.000Z',
        depth: null,
        lat: null,
        lon: null,
        temperature: null,
        tags: [],
      },
    });
  });

  it('takes a decimal comma as a point and keeps negative (south, west) degrees', () => {
    const result = toPayload(draft({ depth: '512,5', lat: '36.1452', lon: '-7.4318', temperature: '4,25' }));
    expect(result.ok && result.body).toMatchObject({ depth: 512.5, lat: 36.1452, lon: -7.4318, temperature: 4.25 });
  });

  it('refuses a time with an impossible month, and says how to type one', () => {
    const result = toPayload(draft({ time: '2026-13-01 10:00:00' }));
    expect(result.ok).toBe(false);
    expect(!result.ok && result.errors.observedAt).toMatch(/UTC time like/);
  });

  it('names each unreadable field, and a missing kind', () => {
    const result = toPayload(draft({ kind: undefined, depth: 'deep', lat: '36,1', lon: 'west' }));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(Object.keys(result.errors).sort()).toEqual(['depth', 'kind', 'lon']);
  });

  it('leaves "both or neither" of a position to the contract', () => {
    const result = toPayload(draft({ lat: '36.1452' }));
    expect(!result.ok && result.errors.lon).toMatch(/both latitude and longitude/);
  });

  it('reads numbers strictly', () => {
    expect(readNumber('  ')).toBeNull();
    expect(readNumber('.5')).toBe(0.5);
    expect(readNumber('1e3')).toBeNaN();
    expect(readNumber('12 m')).toBeNaN();
  });
});

describe('an edit from the form', () => {
  it('shows every value, typed or from the telemetry log', () => {
    const d = draftFromObservation(stored);
    expect(d).toMatchObject({ time: '2026-05-14 21:14:07.250', depth: '512.4', lat: '36.1452', lon: '-7.4318', temperature: '4.1' });
  });

  it('sends nothing but the version when nothing was changed: a telemetry value left as shown stays linked to the log', () => {
    expect(changes(draftFromObservation(stored), stored, 3)).toEqual({ version: 3 });
  });

  it('sends a telemetry value typed over as a typed one, and an emptied one as null (back to the log)', () => {
    expect(changes({ ...draftFromObservation(stored), depth: '515' }, stored, 3)).toEqual({ version: 3, depth: 515 });
    expect(changes({ ...draftFromObservation(stored), temperature: '' }, stored, 3)).toEqual({ version: 3, temperature: null });
  });

  it('sends only the changed fields, a position as a pair, and a cleared value as null', () => {
    const edited = { ...draftFromObservation(stored), note: 'Pale, about 25 cm.', lon: '-7.4320' };
    expect(changes(edited, stored, 3)).toEqual({ version: 3, note: 'Pale, about 25 cm.', lat: 36.1452, lon: -7.432 });
    const cleared = { ...draftFromObservation(stored), lat: '', lon: '' };
    expect(changes(cleared, stored, 4)).toEqual({ version: 4, lat: null, lon: null });
  });

  it('answers the field errors instead of a body when the typing is unreadable', () => {
    const result = changes({ ...draftFromObservation(stored), time: '2026-02-30 10:00' }, stored, 3);
    expect(result).not.toHaveProperty('version');
    expect(result).toHaveProperty('observedAt');
  });
});

describe('merging an edit with a save made meanwhile (three-way: base, theirs, mine)', () => {
  const base = draftFromObservation({ ...stored, depthSource: 'manual' });

  it('takes what only one side changed from that side, and asks nothing', () => {
    const theirs = { ...base, depth: '530' };
    const mine = { ...base, note: 'Pale, about 25 cm.' };
    const { merged, clashes } = mergeEdit(base, theirs, mine);
    expect(clashes).toEqual([]);
    expect(merged).toEqual({ ...base, depth: '530', note: 'Pale, about 25 cm.' });
  });

  it('asks only about a field both changed to different values', () => {
    const theirs = { ...base, title: 'Vase sponge', depth: '530' };
    const mine = { ...base, title: 'Glass sponge', note: 'Pale.' };
    const { merged, clashes } = mergeEdit(base, theirs, mine);
    expect(clashes).toEqual(['title']);
    expect(resolveClashes(merged, mine, clashes, new Set())).toEqual({ ...base, title: 'Glass sponge', depth: '530', note: 'Pale.' });
    expect(resolveClashes(merged, mine, clashes, new Set(['title'] as const)).title).toBe('Vase sponge');
  });

  it('does not ask when both made the same change', () => {
    const same = { ...base, tags: ['sponge', 'stern'] };
    expect(mergeEdit(base, same, { ...same }).clashes).toEqual([]);
  });

  it('keeps a position whole: one side moving the latitude and the other the longitude is a clash, not a mix', () => {
    const theirs = { ...base, lat: '36.2' };
    const mine = { ...base, lon: '-7.5' };
    expect(mergeEdit(base, theirs, mine).clashes).toEqual(['lat', 'lon']);
  });

  it('without a base, treats every difference as a clash', () => {
    expect(mergeEdit(undefined, { ...base, depth: '530' }, { ...base, note: 'x' }).clashes).toEqual(['depth', 'note']);
  });
});

describe('field errors as the form is corrected', () => {
  it('drops the error of a field once it reads well, keeps it while it does not, and leaves other fields’ errors', () => {
    const typed = draft({ time: '2026-13-01 10:00', depth: 'deep' });
    const shown = { observedAt: 'Type a UTC time', depth: 'Depth is a number of metres' };
    const stillWrong = errorsAfterChange(shown, ['time'], { ...typed, time: '2026-13-01 10:0' });
    expect(Object.keys(stillWrong).sort()).toEqual(['depth', 'observedAt']);
    const fixed = errorsAfterChange(shown, ['time'], { ...typed, time: '2026-12-01 10:00' });
    expect(fixed).toEqual({ depth: 'Depth is a number of metres' });
  });

  it('re-checks the other half of a position with the half that was changed', () => {
    const typed = draft({ lat: '36.1' });
    const shown = { lon: 'Give both latitude and longitude, or neither' };
    expect(errorsAfterChange(shown, ['lon'], { ...typed, lon: '-7.4' })).toEqual({});
    expect(errorsAfterChange(shown, ['lat'], { ...typed, lat: '' })).toEqual({});
  });
});
