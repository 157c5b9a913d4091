import { describe, expect, it } from 'vitest';
import Timecode from 'smpte-timecode';
import {
  FRAME_RATES,
  framesToTimecode,
  instantFromTimecode,
  instantOfRecordingTimecode,
  timecodeAt,
  timecodeToFrames,
  type FrameRate,
  type FrameRateName,
} from '../../lib/timecode';

const DF2997 = FRAME_RATES['29.97 DF'];
const DF5994 = FRAME_RATES['59.94 DF'];
const START = Date.UTC(2024, 5, 1, 3, 15, 0);

function frames(label: string, rate: FrameRate): number {
  const r = timecodeToFrames(label, rate);
  if (!r.ok) throw new Error(`${label}: ${r.message}`);
  return r.value;
}

// Arguments that make smpte-timecode 1.3.6 count at each preset
const REFERENCE_ARGS: Record<FrameRateName, [number, boolean]> = {
  '23.976': [23.976, false],
  '24': [24, false],
  '25': [25, false],
  '29.97': [29.97, false],
  '29.97 DF': [29.97, true],
  '30': [30, false],
  '50': [50, false],
  '59.94': [59.94, false],
  '59.94 DF': [59.94, true],
  '60': [60, false],
};

describe('29.97 drop-frame (SMPTE ST 12-1)', () => {
  // ST 12-1 drop-frame rule: labels ;00 and ;01 are skipped at the start of each
  // minute except minutes 00, 10, 20, 30, 40, 50. The frame numbers below follow
  // from that rule (computed by hand): a minute holds 1798 frames, ten minutes 17982.
  it('labels frame 1800 as 00:01:00;02', () => {
    expect(framesToTimecode(1800, DF2997)).toBe('00:01:00;02');
    expect(frames('00:01:00;02', DF2997)).toBe(1800);
  });

  it('labels frame 1799 as 00:00:59;29', () => {
    expect(framesToTimecode(1799, DF2997)).toBe('00:00:59;29');
  });

  it('labels frame 17982 as 00:10:00;00 (no drop at the tenth minute)', () => {
    expect(framesToTimecode(17982, DF2997)).toBe('00:10:00;00');
    expect(frames('00:10:00;00', DF2997)).toBe(17982);
    expect(framesToTimecode(17982 + 1800, DF2997)).toBe('00:11:00;02');
  });

  it('labels frame 107892 as 01:00:00;00', () => {
    expect(framesToTimecode(107892, DF2997)).toBe('01:00:00;00');
    expect(frames('01:00:00;00', DF2997)).toBe(107892);
  });

  it('refuses the skipped labels', () => {
    for (const label of ['00:01:00;00', '00:01:00;01', '00:59:00;01', '23:09:00;00']) {
      const r = timecodeToFrames(label, DF2997);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error).toBe('dropped-label');
    }
    expect(timecodeToFrames('00:20:00;00', DF2997).ok).toBe(true);
    expect(timecodeToFrames('00:01:01;00', DF2997).ok).toBe(true);
  });

  it('accepts "." for ";" and refuses ":" before the frames', () => {
    expect(frames('00:01:00.02', DF2997)).toBe(1800);
    const r = timecodeToFrames('00:01:00:02', DF2997);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toBe('separator');
  });
});

describe('59.94 drop-frame', () => {
  // Four labels skipped per minute except every tenth minute (common practice,
  // as counted by smpte-timecode 1.3.6): a minute holds 3596 frames, ten minutes 35964
  // (computed by hand)
  it('skips four labels a minute', () => {
    expect(framesToTimecode(3599, DF5994)).toBe('00:00:59;59');
    expect(framesToTimecode(3600, DF5994)).toBe('00:01:00;04');
    for (const ff of ['00', '01', '02', '03']) {
      expect(timecodeToFrames(`00:01:00;${ff}`, DF5994).ok).toBe(false);
    }
    expect(frames('00:01:00;04', DF5994)).toBe(3600);
  });

  it('keeps every label at the tenth minute', () => {
    expect(framesToTimecode(35964, DF5994)).toBe('00:10:00;00');
    expect(framesToTimecode(215784, DF5994)).toBe('01:00:00;00');
  });
});

describe('non-drop rates', () => {
  it('counts whole frames per second', () => {
    // 30 × 3600 = 108000, 25 × 3600 = 90000, 24 × 3600 = 86400 (computed by hand)
    expect(framesToTimecode(108000, FRAME_RATES['30'])).toBe('01:00:00:00');
    expect(frames('01:00:00:00', FRAME_RATES['30'])).toBe(108000);
    expect(framesToTimecode(90000, FRAME_RATES['25'])).toBe('01:00:00:00');
    expect(framesToTimecode(86400, FRAME_RATES['23.976'])).toBe('01:00:00:00');
    // 3599 = 59 × 60 + 59 (computed by hand)
    expect(framesToTimecode(3599, FRAME_RATES['60'])).toBe('00:00:59:59');
  });

  it('refuses a drop-frame label at a non-drop rate', () => {
    const r = timecodeToFrames('00:00:01;00', FRAME_RATES['29.97']);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toBe('separator');
  });

  it('refuses fields out of range', () => {
    for (const label of ['24:00:00:00', '00:60:00:00', '00:00:60:00', '00:00:00:25']) {
      const r = timecodeToFrames(label, FRAME_RATES['25']);
      expect(r.ok, label).toBe(false);
      if (!r.ok) expect(r.error).toBe('out-of-range');
    }
    // The frames field runs 00 to rate − 1 (SMPTE ST 12-1)
    expect(timecodeToFrames('00:00:00:24', FRAME_RATES['25']).ok).toBe(true);
  });

  it('refuses malformed labels', () => {
    for (const label of ['', '1:00:00:00', '00:00:00', '00-00-00-00', '00:00:00:00:00', 'ab:cd:ef:gh']) {
      const r = timecodeToFrames(label, FRAME_RATES['25']);
      expect(r.ok, label).toBe(false);
      if (!r.ok) expect(r.error).toBe('format');
    }
    // One second at 25 fps is 25 frames (computed by hand)
    expect(frames('  00:00:01:00 ', FRAME_RATES['25'])).toBe(25);
  });

  it('wraps after 24 hours', () => {
    // 24 h at 25 fps = 2 160 000 frames (computed by hand)
    expect(framesToTimecode(2_160_000, FRAME_RATES['25'])).toBe('00:00:00:00');
    // 24 h of 29.97 DF labels = 2 592 000 − 2 × 1296 = 2 589 408 frames (computed by hand)
    expect(framesToTimecode(2_589_407, DF2997)).toBe('23:59:59;29');
    expect(framesToTimecode(2_589_408, DF2997)).toBe('00:00:00;00');
  });
});

describe('rates', () => {
  it('accepts 29.97 written as a decimal', () => {
    // Same frame as the ST 12-1 one-hour check above
    expect(framesToTimecode(107892, { fps: 29.97, dropFrame: true })).toBe('01:00:00;00');
  });

  it('refuses drop-frame at rates without it and unsupported rates', () => {
    expect(() => framesToTimecode(0, { fps: 25, dropFrame: true })).toThrow(RangeError);
    expect(() => framesToTimecode(0, { fps: 24000 / 1001, dropFrame: true })).toThrow(RangeError);
    expect(() => framesToTimecode(0, { fps: 30, dropFrame: true })).toThrow(RangeError);
    expect(() => framesToTimecode(0, { fps: 27, dropFrame: false })).toThrow(RangeError);
    expect(() => framesToTimecode(0, { fps: Number.NaN, dropFrame: false })).toThrow(RangeError);
  });

  it('refuses negative and fractional frame indices', () => {
    expect(() => framesToTimecode(-1, FRAME_RATES['25'])).toThrow(RangeError);
    expect(() => framesToTimecode(1.5, FRAME_RATES['25'])).toThrow(RangeError);
  });
});

describe('agreement with smpte-timecode 1.3.6', () => {
  for (const name of Object.keys(FRAME_RATES) as FrameRateName[]) {
    it(`gives the same labels and frame counts at ${name}`, () => {
      const rate = FRAME_RATES[name];
      const [refRate, refDrop] = REFERENCE_ARGS[name];
      const checked: number[] = [];
      for (let f = 0; f < 40_000; f++) checked.push(f);
      for (let f = 40_000; f < Math.round(rate.fps * 86_000); f += 997) checked.push(f);
      for (const f of checked) {
        const expected = new Timecode(f, refRate, refDrop).toString();
        const label = framesToTimecode(f, rate);
        if (label !== expected) expect(label, `frame ${f}`).toBe(expected);
        const back = frames(label, rate);
        if (back !== f) expect(back, label).toBe(f);
      }
    });
  }

  it('agrees on which drop-frame labels exist over the first twelve minutes', () => {
    for (let m = 0; m < 12; m++) {
      for (let s = 0; s < 60; s++) {
        for (let ff = 0; ff < 30; ff++) {
          const label = `00:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')};${String(ff).padStart(2, '0')}`;
          let referenceValid = true;
          try {
            new Timecode(label, 29.97, true);
          } catch {
            referenceValid = false;
          }
          const ours = timecodeToFrames(label, DF2997).ok;
          if (ours !== referenceValid) expect(ours, label).toBe(referenceValid);
        }
      }
    }
  });
});

describe('wall clock ↔ time code', () => {
  it('uses the real 30000/1001 rate', () => {
    // One hour of wall clock at 30000/1001 fps is floor(107892.1) = 107892 frames (computed by hand):
    // 01:00:00;00 in drop-frame, 00:59:56:12 in non-drop (108 frames, 3.6 s behind)
    expect(timecodeAt(START + 3_600_000, START, DF2997)).toBe('01:00:00;00');
    expect(timecodeAt(START + 3_600_000, START, FRAME_RATES['29.97'])).toBe('00:59:56:12');
    expect(timecodeAt(START + 3_600_000, START, FRAME_RATES['30'])).toBe('01:00:00:00');
  });

  it('gives the frame on screen, not the nearest one', () => {
    // Frame 1 of 25 fps starts at 40 ms (computed by hand)
    expect(timecodeAt(START + 39, START, FRAME_RATES['25'])).toBe('00:00:00:00');
    expect(timecodeAt(START + 40, START, FRAME_RATES['25'])).toBe('00:00:00:01');
  });

  it('gives null before the recording or for non-finite instants', () => {
    expect(timecodeAt(START - 1, START, DF2997)).toBeNull();
    expect(timecodeAt(Number.NaN, START, DF2997)).toBeNull();
  });

  it('gives the instant a frame began, rounded up to the millisecond', () => {
    // 107892 frames × 1001/30000 s = 3599.9964 s → 3 599 997 ms (computed by hand)
    expect(instantFromTimecode('01:00:00;00', START, DF2997)).toEqual({ ok: true, value: START + 3_599_997 });
    // 17982 frames × 1001/30000 s = 599.9994 s → 600 000 ms (computed by hand)
    expect(instantFromTimecode('00:10:00;00', START, DF2997)).toEqual({ ok: true, value: START + 600_000 });
    // 25 frames at 25 fps = exactly 1 s (computed by hand)
    expect(instantFromTimecode('00:00:01:00', START, FRAME_RATES['25'])).toEqual({ ok: true, value: START + 1000 });
  });

  it('reads a typed time code against a dive recording, or says why it cannot', () => {
    const startAt = new Date(START).toISOString();
    // Same arithmetic as above: 01:00:00;00 at 29.97 drop-frame is 3 599 997 ms in (computed by hand).
    expect(instantOfRecordingTimecode({ startAt, frameRate: '29.97 DF' }, ' 01:00:00;00 ')).toEqual({
      ok: true,
      iso: new Date(START + 3_599_997).toISOString(),
    });
    expect(instantOfRecordingTimecode({ startAt: null, frameRate: '25' }, '00:00:01:00')).toMatchObject({
      ok: false,
      message: expect.stringMatching(/recording start/),
    });
    expect(instantOfRecordingTimecode({ startAt, frameRate: '48' }, '00:00:01:00')).toMatchObject({ ok: false });
    // 00:01:00;00 does not exist at 29.97 drop-frame: frames 0 and 1 of minute 1 are skipped (SMPTE ST 12-1).
    expect(instantOfRecordingTimecode({ startAt, frameRate: '29.97 DF' }, '00:01:00;00')).toMatchObject({ ok: false });
  });

  it('passes on label errors', () => {
    const r = instantFromTimecode('00:01:00;00', START, DF2997);
    expect(r.ok).toBe(false);
  });

  it('round-trips label → instant → label at every rate', () => {
    for (const name of Object.keys(FRAME_RATES) as FrameRateName[]) {
      const rate = FRAME_RATES[name];
      for (let f = 0; f < 5_000_000; f += 7919) {
        const label = framesToTimecode(f, rate);
        const at = instantFromTimecode(label, START, rate);
        expect(at.ok).toBe(true);
        if (at.ok && timecodeAt(at.value, START, rate) !== label) {
          expect(timecodeAt(at.value, START, rate), `${name} ${label}`).toBe(label);
        }
      }
    }
  });
});
