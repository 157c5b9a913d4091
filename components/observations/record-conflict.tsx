import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

/**
 * The version a form's save answers: the entry's current one until something is typed (so a form
 * left open follows the entry), then the one typing started at, then the one a "Keep mine" chose.
 * Wrap each field's setter in `typing`.
 */
export function useEditBase(version: number) {
  const [typedAt, setBaseVersion] = useState<number | null>(null);
  const typing =
    <T,>(set: (v: T) => void) =>
    (v: T) => {
      setBaseVersion((b) => b ?? version);
      set(v);
    };
  return { baseVersion: typedAt ?? version, setBaseVersion, typing };
}

export type ConflictField = { key: string; label: string; theirs: string; mine: string };

type Props = {
  /** Names what was being saved, e.g. "identification". */
  what: string;
  testID: string;
  theirVersion: number;
  baseVersion: number;
  fields: ConflictField[];
  busy: boolean;
  onKeepMine: () => void;
  onTakeTheirs: () => void;
};

/**
 * A save refused because someone else changed the entry first (an edit, an identification, a
 * find): their values beside the ones typed here, and the choice between them, the same panel
 * everywhere so the same situation reads the same.
 */
export function RecordConflict({ what, testID, theirVersion, baseVersion, fields, busy, onKeepMine, onTakeTheirs }: Props) {
  const { colors } = useTheme();
  const differing = fields.filter((f) => f.theirs !== f.mine);
  return (
    <View style={[styles.conflict, { borderColor: colors.warning, backgroundColor: colors.surface }]} testID={testID} role="alert">
      <Text variant="title">Someone else changed this entry</Text>
      <Text muted>
        It is now at version {theirVersion}; your {what} started from version {baseVersion}. Nothing has been overwritten. Choose what to
        keep.
      </Text>
      {differing.length === 0 ? <Text>Your {what} and theirs agree.</Text> : null}
      {differing.map((f) => (
        <View key={f.key} style={styles.clash} testID={`${testID}-${f.key}`}>
          <Text variant="label">{f.label}</Text>
          <View style={styles.sides}>
            <View style={[styles.side, { borderColor: colors.border }]}>
              <Text variant="caption" muted>
                Theirs
              </Text>
              <Text testID={`${testID}-theirs-${f.key}`}>{f.theirs || '—'}</Text>
            </View>
            <View style={[styles.side, { borderColor: colors.accent }]}>
              <Text variant="caption" muted>
                Yours
              </Text>
              <Text testID={`${testID}-mine-${f.key}`}>{f.mine || '—'}</Text>
            </View>
          </View>
        </View>
      ))}
      <View style={styles.row}>
        <Button label="Keep mine" testID={`${testID}-keep-mine`} busy={busy} onPress={onKeepMine} />
        <Button label="Use theirs" tone="secondary" testID={`${testID}-take-theirs`} onPress={onTakeTheirs} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  conflict: { borderWidth: 2, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  clash: { gap: space.xs },
  sides: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  side: { flex: 1, minWidth: 140, borderWidth: 1, borderRadius: radius.md, padding: space.sm, gap: 2 },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
});
