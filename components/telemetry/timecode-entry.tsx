import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import type { Dive } from '@/lib/schemas';
import { FRAME_RATES, instantOfRecordingTimecode, isFrameRateName } from '@/lib/timecode';
import { space } from '@/lib/tokens';

/**
 * Sets an entry's time from the video time code on screen, for logging while reviewing the
 * recording. Shown only once the dive's recording clock is set.
 */
export function TimecodeEntry({ dive, onTime }: { dive: Pick<Dive, 'recording'>; onTime: (iso: string) => void }) {
  const [label, setLabel] = useState('');
  const [error, setError] = useState<string | undefined>();
  const { startAt, frameRate } = dive.recording;
  if (!startAt || !frameRate || !isFrameRateName(frameRate)) return null;
  const apply = () => {
    const result = instantOfRecordingTimecode(dive.recording, label);
    if (!result.ok) return setError(result.message);
    setError(undefined);
    onTime(result.iso);
  };
  const dropFrame = FRAME_RATES[frameRate].dropFrame;
  return (
    <View style={styles.row}>
      <View style={styles.field}>
        <Field
          label={`Video time code, ${frameRate} fps`}
          value={label}
          onChangeText={setLabel}
          onSubmitEditing={apply}
          hint={`hours:minutes:seconds${dropFrame ? ';' : ':'}frames; sets the time to the frame on screen`}
          error={error}
          mono
          autoCapitalize="none"
          autoCorrect={false}
          testID="timecode-input"
        />
      </View>
      <Button label="Use time code" tone="secondary" compact onPress={apply} disabled={label.trim() === ''} testID="timecode-apply" />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: space.sm, flexWrap: 'wrap' },
  field: { flexGrow: 1, flexBasis: 200 },
});
