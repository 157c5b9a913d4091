/**
 * SMPTE ST 12-1 time code labels for dive video, and their mapping to wall
 * clock time.
 *
 * A label counts frames at the nominal (integer) rate: 30 labels a second at
 * 29.97 fps. Drop-frame counting skips the labels ;00 and ;01 (;00–;03 at
 * 59.94) at the start of every minute except minutes divisible by ten, which
 * keeps the label within a few frames of elapsed time.
 *
 * Converting between wall clock and frames uses the real rate, the exact
 * rational 30000/1001 for "29.97" (24000/1001, 60000/1001 likewise), never the
 * nominal rate: an hour of 29.97 video has 107 892 frames, and counting it at
 * 30 fps would misplace an observation by 3.6 s after one hour. Labels wrap
 * after 24 hours, as the standard's clock does.
 */

/**
 * A video frame rate. `fps` is the real rate, e.g. `30000 / 1001` (29.97…) or
 * `25`; values within 0.01 of n·1000/1001 are taken as that exact rational.
 * `dropFrame` is allowed at 29.97 and 59.94 only.
 */
export interface FrameRate {
  readonly fps: number;
  readonly dropFrame: boolean;
}

/** The frame rates used by dive video, by their usual names. */
export const FRAME_RATES = {
  '23.976': { fps: 24000 / 1001, dropFrame: false },
  '24': { fps: 24, dropFrame: false },
  '25': { fps: 25, dropFrame: false },
  '29.97': { fps: 30000 / 1001, dropFrame: false },
  '29.97 DF': { fps: 30000 / 1001, dropFrame: true },
  '30': { fps: 30, dropFrame: false },
  '50': { fps: 50, dropFrame: false },
  '59.94': { fps: 60000 / 1001, dropFrame: false },
  '59.94 DF': { fps: 60000 / 1001, dropFrame: true },
  '60': { fps: 60, dropFrame: false },
} as const satisfies Record<string, FrameRate>;

/** Name of a preset in {@link FRAME_RATES}. */
export type FrameRateName = keyof typeof FRAME_RATES;

/** Why a label was refused. */
export type TimecodeError = 'format' | 'separator' | 'out-of-range' | 'dropped-label';

/** Result of reading a label. */
export type TimecodeResult<T> = { ok: true; value: T } | { ok: false; error: TimecodeError; message: string };

interface ResolvedRate {
  /** Labels per second. */
  nominal: number;
  /** Real rate as num/den frames per second. */
  num: number;
  den: number;
  /** Labels skipped per minute: 0, 2 or 4. */
  drop: number;
  framesPerDay: number;
}

const INTEGER_RATES = new Set([24, 25, 30, 50, 60]);
const NTSC_RATES = new Set([24, 30, 60]);

function resolve(rate: FrameRate): ResolvedRate {
  const { fps, dropFrame } = rate;
  if (!Number.isFinite(fps) || fps <= 0) throw new RangeError(`unsupported frame rate ${fps}`);
  const nominal = Math.round(fps);
  let num: number;
  let den: number;
  if (fps === nominal && INTEGER_RATES.has(nominal)) {
    num = nominal;
    den = 1;
  } else if (NTSC_RATES.has(nominal) && Math.abs(fps - (nominal * 1000) / 1001) < 0.01) {
    num = nominal * 1000;
    den = 1001;
  } else {
    throw new RangeError(`unsupported frame rate ${fps}`);
  }
  let drop = 0;
  if (dropFrame) {
    if (den !== 1001 || nominal % 30 !== 0) {
      throw new RangeError('drop-frame time code exists only at 29.97 and 59.94 fps');
    }
    drop = (2 * nominal) / 30;
  }
  // 1440 minutes a day, of which the 144 tenth minutes keep all their labels
  const framesPerDay = nominal * 86_400 - drop * (1440 - 144);
  return { nominal, num, den, drop, framesPerDay };
}

function pad2(n: number): string {
  return n < 10 ? `0${n}` : String(n);
}

/**
 * The label of a frame counted from 00:00:00:00. Drop-frame labels use ";"
 * before the frames field.
 *
 * @param frames frame index, a non-negative integer; wraps after 24 hours
 * @throws RangeError for a negative or fractional frame index or an unsupported rate
 */
export function framesToTimecode(frames: number, rate: FrameRate): string {
  const r = resolve(rate);
  if (!Number.isInteger(frames) || frames < 0) {
    throw new RangeError(`frame index must be a non-negative integer, got ${frames}`);
  }
  let f = frames % r.framesPerDay;
  if (r.drop > 0) {
    const perTenMinutes = r.nominal * 600 - 9 * r.drop;
    const perMinute = r.nominal * 60 - r.drop;
    const tens = Math.floor(f / perTenMinutes);
    const rest = f % perTenMinutes;
    // The first minute of each ten keeps all its labels; every later one skips `drop`
    const skippedMinutes = rest < r.drop ? 0 : Math.floor((rest - r.drop) / perMinute);
    f += r.drop * (9 * tens + skippedMinutes);
  }
  const frameField = f % r.nominal;
  const totalSeconds = Math.floor(f / r.nominal);
  const seconds = totalSeconds % 60;
  const minutes = Math.floor(totalSeconds / 60) % 60;
  const hours = Math.floor(totalSeconds / 3600) % 24;
  const sep = r.drop > 0 ? ';' : ':';
  return `${pad2(hours)}:${pad2(minutes)}:${pad2(seconds)}${sep}${pad2(frameField)}`;
}

const LABEL = /^(\d{2}):(\d{2}):(\d{2})([:;.])(\d{2})$/;

/**
 * Frame index, counted from 00:00:00:00, of a label "HH:MM:SS:FF" (non-drop)
 * or "HH:MM:SS;FF" (drop-frame; "." is accepted for ";", as on displays
 * without a semicolon). The separator must agree with the rate, and
 * drop-frame labels that the standard skips (such as 00:01:00;00) are refused.
 *
 * @throws RangeError only for an unsupported rate; a bad label is an error result
 */
export function timecodeToFrames(label: string, rate: FrameRate): TimecodeResult<number> {
  const r = resolve(rate);
  const m = LABEL.exec(label.trim());
  if (m === null) {
    return { ok: false, error: 'format', message: `"${label}" is not a time code of the form HH:MM:SS:FF` };
  }
  const [, hh, mm, ss, sep, ff] = m as unknown as [string, string, string, string, string, string];
  const labelIsDrop = sep !== ':';
  if (labelIsDrop !== r.drop > 0) {
    return {
      ok: false,
      error: 'separator',
      message: r.drop > 0 ? 'drop-frame time code needs ";" before the frames' : 'non-drop time code needs ":" before the frames',
    };
  }
  const hours = Number(hh);
  const minutes = Number(mm);
  const seconds = Number(ss);
  const frames = Number(ff);
  if (hours > 23 || minutes > 59 || seconds > 59 || frames >= r.nominal) {
    return {
      ok: false,
      error: 'out-of-range',
      message: `"${label}" has a field out of range at ${r.nominal} frames per second`,
    };
  }
  if (r.drop > 0 && seconds === 0 && minutes % 10 !== 0 && frames < r.drop) {
    return { ok: false, error: 'dropped-label', message: `"${label}" is skipped in drop-frame counting` };
  }
  const totalMinutes = hours * 60 + minutes;
  const count = (totalMinutes * 60 + seconds) * r.nominal + frames - r.drop * (totalMinutes - Math.floor(totalMinutes / 10));
  return { ok: true, value: count };
}

/**
 * The label of the frame on screen at an instant of a recording that started
 * at 00:00:00:00. The frame shown at t is the last one that began at or before
 * t, at the real frame rate.
 *
 * @param observedAtMs the instant, ms since epoch UTC
 * @param recordingStartMs when the first frame was recorded, ms since epoch UTC
 * @returns the label, or null when the instant is before the recording or not finite
 * @throws RangeError for an unsupported rate
 */
export function timecodeAt(observedAtMs: number, recordingStartMs: number, rate: FrameRate): string | null {
  const r = resolve(rate);
  const elapsedMs = observedAtMs - recordingStartMs;
  if (!Number.isFinite(elapsedMs) || elapsedMs < 0) return null;
  // Exact for integer ms: elapsed·num and den·1000 are integers well inside
  // 2⁵³, and their quotient is never within rounding of an integer unless it is one.
  const frames = Math.floor((elapsedMs * r.num) / (r.den * 1000));
  return framesToTimecode(frames, rate);
}

/**
 * The instant a labelled frame began, for a recording that started at
 * 00:00:00:00, rounded up to the next whole millisecond so that
 * `timecodeAt(instant)` gives the same label back. A label names a frame
 * within one 24-hour cycle, so the result is within 24 hours of the start.
 *
 * @param recordingStartMs when the first frame was recorded, ms since epoch UTC
 * @throws RangeError for an unsupported rate or a non-finite start
 */
export function instantFromTimecode(label: string, recordingStartMs: number, rate: FrameRate): TimecodeResult<number> {
  if (!Number.isFinite(recordingStartMs)) throw new RangeError('recording start must be a finite number of ms');
  const r = resolve(rate);
  const frames = timecodeToFrames(label, rate);
  if (!frames.ok) return frames;
  const offsetMs = (frames.value * r.den * 1000) / r.num;
  return { ok: true, value: Math.ceil(recordingStartMs + offsetMs) };
}

/** Whether a name is one of the {@link FRAME_RATES} presets. */
export const isFrameRateName = (name: string): name is FrameRateName => Object.prototype.hasOwnProperty.call(FRAME_RATES, name);

/**
 * The instant (ISO 8601 UTC) a typed time code names on a recording that started at `startAt`
 * with the preset `frameRate`, or a message saying why it names none.
 */
export function instantOfRecordingTimecode(
  recording: { startAt: string | null; frameRate: string | null },
  label: string,
): { ok: true; iso: string } | { ok: false; message: string } {
  const { startAt, frameRate } = recording;
  const start = startAt ? Date.parse(startAt) : Number.NaN;
  if (!frameRate || !isFrameRateName(frameRate) || !Number.isFinite(start)) {
    return { ok: false, message: 'Set the recording start and frame rate on the dive first.' };
  }
  const result = instantFromTimecode(label.trim(), start, FRAME_RATES[frameRate]);
  return result.ok ? { ok: true, iso: new Date(result.value).toISOString() } : { ok: false, message: result.message };
}
