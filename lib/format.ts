/** Display formatting shared by the app, mails and exports. UTC is always shown with its "Z". */
import { DateTime } from 'luxon';

/** "2026-05-14 21:14:07Z" (seconds always; milliseconds only when asked). */
export function formatUtc(iso: string, withMs = false): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '—';
  const s = d.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, withMs ? 23 : 19)}Z`;
}

/** "21:14:07Z" */
export function formatUtcTime(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? '—' : `${d.toISOString().slice(11, 19)}Z`;
}

/** The same instant in the campaign's display zone, e.g. "22:14:07 WEST". */
export function formatInZone(iso: string, zone: string): string {
  const dt = DateTime.fromISO(iso, { zone: 'utc' }).setZone(zone);
  return dt.isValid ? dt.toFormat('yyyy-LL-dd HH:mm:ss ZZZZ') : '—';
}

export function formatDepth(depth: number | null | undefined): string {
  return depth == null ? '—' : `${depth.toFixed(1)} m`;
}

export function formatTemperature(t: number | null | undefined): string {
  return t == null ? '—' : `${t.toFixed(2)} °C`;
}

export function formatLatLon(lat: number | null | undefined, lon: number | null | undefined): string {
  if (lat == null || lon == null) return '—';
  const ns = lat >= 0 ? 'N' : 'S';
  const ew = lon >= 0 ? 'E' : 'W';
  return `${Math.abs(lat).toFixed(5)}° ${ns}, ${Math.abs(lon).toFixed(5)}° ${ew}`;
}

/**
 * Reads what a person types as a UTC time: "2026-05-14 21:14:07", with optional milliseconds,
 * a "T" instead of the space and an optional trailing "Z". Never read as local time.
 */
export function parseUtcInput(text: string): string | null {
  const m = /^\s*(\d{4})-(\d{2})-(\d{2})[ T](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,3}))?)?\s*Z?\s*$/i.exec(text);
  if (!m) return null;
  const [, y, mo, d, h, mi, sec = '0', ms = '0'] = m;
  // Luxon refuses a month, day, minute or second that does not exist (month 13, 30 February) where
  // Date.UTC would roll it over into a later date: a typed time that rolls over is a typo. It reads
  // 24:00 as the next midnight (ISO 8601 allows it), which a typed time does not mean either.
  if (Number(h) > 23) return null;
  const dt = DateTime.fromObject(
    {
      year: Number(y),
      month: Number(mo),
      day: Number(d),
      hour: Number(h),
      minute: Number(mi),
      second: Number(sec),
      millisecond: Number(ms.padEnd(3, '0')),
    },
    { zone: 'utc' },
  );
  return dt.isValid ? new Date(dt.toMillis()).toISOString() : null;
}

/** The editable text form of an instant: "2026-05-14 21:14:07". */
export function toUtcInput(iso: string): string {
  return new Date(iso).toISOString().slice(0, 19).replace('T', ' ');
}

/** As {@link toUtcInput}, with the milliseconds when there are any: "2026-05-14 21:14:07.250". */
export function toUtcInputExact(iso: string): string {
  const s = new Date(iso).toISOString();
  return toUtcInput(iso).concat(s.slice(19, 23) === '.000' ? '' : s.slice(19, 23));
}

/**
 * A name with its open-nomenclature qualifier where taxonomists write it (common practice):
 * "cf." and "aff." before the epithet they doubt ("Munida cf. sarsi"), "sp." and "indet."
 * after the genus or higher name ("Munida sp.").
 */
export function formatScientificName(name: string, qualifier: string | null | undefined): string {
  const words = name.trim().split(/\s+/);
  if (!qualifier) return words.join(' ');
  if ((qualifier === 'cf.' || qualifier === 'aff.') && words.length > 1) {
    return [...words.slice(0, -1), qualifier, words[words.length - 1]].join(' ');
  }
  return [...words, qualifier].join(' ');
}
