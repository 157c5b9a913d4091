import { Text } from '@/components/ui/text';
import type { Dive } from '@/lib/schemas';
import { FRAME_RATES, isFrameRateName, timecodeAt, type FrameRateName } from '@/lib/timecode';

/** The video time code of the frame on screen at an instant, once the dive's recording clock is set. */
export function timecodeOf(dive: Pick<Dive, 'recording'>, observedAt: string): { label: string | null; rate: FrameRateName } | null {
  const { startAt, frameRate } = dive.recording;
  if (!startAt || !frameRate || !isFrameRateName(frameRate)) return null;
  const at = Date.parse(observedAt);
  const start = Date.parse(startAt);
  if (!Number.isFinite(at) || !Number.isFinite(start)) return null;
  return { label: timecodeAt(at, start, FRAME_RATES[frameRate]), rate: frameRate };
}

/**
 * An entry's video time code ("TC 01:02:03;04" at 29.97 drop-frame), or "before the recording"
 * for an entry logged before the camera started. Shows nothing until the recording's start and
 * frame rate are set on the dive.
 */
export function TimecodeLabel({ dive, observedAt }: { dive: Pick<Dive, 'recording'>; observedAt: string }) {
  const tc = timecodeOf(dive, observedAt);
  if (!tc) return null;
  return (
    <Text
      variant="monoSmall"
      muted
      testID="timecode"
      accessibilityLabel={tc.label ? `Video time code ${tc.label} at ${tc.rate} frames per second` : 'Logged before the video recording'}
    >
      {tc.label ? `TC ${tc.label}` : 'before the recording'}
    </Text>
  );
}
