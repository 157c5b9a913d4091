import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { diveKeys, useUpdateDive } from '@/hooks/dives';
import type { Dive } from '@/lib/schemas';
import { space } from '@/lib/tokens';

const shown = (cm: number | null) => (cm === null ? '' : String(cm));

/**
 * The distance between the vehicle's two lasers on this dive: measuring on the dive's photos starts
 * from it. Vehicles differ, so it is set per dive; left empty, each person's last spacing is offered.
 */
export function LaserSpacingSettings({ dive }: { dive: Dive }) {
  const update = useUpdateDive(dive.id);
  const qc = useQueryClient();
  // What this person typed, with the version it started from; until they type, the stored value shows live.
  const [draft, setDraft] = useState<{ text: string; version: number } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const text = draft?.text ?? shown(dive.laserSpacingCm);

  const save = () => {
    if (!draft) return;
    const typed = draft.text.trim();
    const cm = typed === '' ? null : Number(typed.replace(',', '.'));
    if (cm !== null && !(Number.isFinite(cm) && cm >= 1 && cm <= 500)) {
      setError('Give 1 to 500 cm, or leave it empty');
      return;
    }
    setError(null);
    update.mutate(
      { version: draft.version, laserSpacingCm: cm },
      {
        onSuccess: () => {
          setDraft(null);
          setSaved(true);
        },
        onError: (err) => {
          if (err instanceof ApiError && err.status === 409) {
            setDraft(null);
            void qc.invalidateQueries({ queryKey: diveKeys.detail(dive.id) });
            setError('Someone else changed this dive a moment ago; its spacing is shown now. Make your change again.');
          } else setError(err instanceof Error ? err.message : 'Could not save the spacing.');
        },
      },
    );
  };

  return (
    <View style={styles.wrap} testID="laser-spacing-settings">
      <Text variant="label">Laser scale</Text>
      <Text variant="caption" muted>
        Measuring on this dive’s photos starts from this spacing; it can still be changed for a single measurement.
      </Text>
      <Field
        label="Laser spacing (cm)"
        value={text}
        onChangeText={(t) => {
          setDraft({ text: t, version: draft?.version ?? dive.version });
          setSaved(false);
        }}
        inputMode="decimal"
        keyboardType="decimal-pad"
        mono
        hint="Distance between the two lasers. Empty: each person’s last spacing, or 10 cm."
        error={error ?? undefined}
        testID="dive-laser-spacing"
      />
      <View style={styles.actions}>
        <Button label="Save" onPress={save} busy={update.isPending} disabled={!draft} testID="dive-laser-spacing-save" />
        {saved ? (
          <Text variant="caption" muted testID="dive-laser-spacing-saved">
            Saved.
          </Text>
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  actions: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
