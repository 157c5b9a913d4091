import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useSetPhase } from '@/hooks/dives';
import { formatUtc, parseUtcInput, toUtcInputExact } from '@/lib/format';
import type { Dive } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { phaseSteps } from '@/lib/dive-phases';

/**
 * The dive's four phase times, which the statistics and the plots are cut by. A phase marked late
 * in the control room (or missed) is corrected here by the lead or the pilot, to the second.
 */
export function PhaseTimes({ dive, mayEdit }: { dive: Dive; mayEdit: boolean }) {
  return (
    <View style={styles.wrap} testID="phase-times">
      <Text variant="label">Dive phases (UTC)</Text>
      {mayEdit ? (
        <Text variant="caption" muted>
          Correct a phase marked late or missed: the statistics and the plots follow. Leave a time empty to clear it.
        </Text>
      ) : null}
      {phaseSteps.map((s) =>
        mayEdit ? (
          <PhaseRow key={s.phase} dive={dive} step={s} />
        ) : (
          <View key={s.phase} style={styles.row}>
            <Text style={styles.grow}>{s.label}</Text>
            <Text variant="mono" testID={`phase-time-${s.phase}`}>
              {dive.phases[s.key] ? formatUtc(dive.phases[s.key]!) : '—'}
            </Text>
          </View>
        ),
      )}
      {mayEdit ? null : (
        <Text variant="caption" muted>
          Only the lead or the pilot can change these.
        </Text>
      )}
    </View>
  );
}

function PhaseRow({ dive, step }: { dive: Dive; step: (typeof phaseSteps)[number] }) {
  const setPhase = useSetPhase(dive.id);
  const toast = useToast();
  const stored = dive.phases[step.key];
  // What was typed, until it is saved; until then the field follows the dive (a mark made live shows).
  const [typed, setTyped] = useState<string | null>(null);
  const [error, setError] = useState<string | undefined>();
  const value = typed ?? (stored ? toUtcInputExact(stored) : '');

  const save = () => {
    const text = value.trim();
    const at = text === '' ? null : parseUtcInput(text);
    if (text !== '' && at === null) return setError('Type a UTC time like 2026-05-13 17:35:00, or leave it empty to clear');
    setError(undefined);
    const before = stored;
    setPhase.mutate(
      { phase: step.phase, at },
      {
        onSuccess: () => {
          setTyped(null);
          toast(at ? `${step.label} set to ${formatUtc(at)}` : `${step.label} cleared`, {
            action: { label: 'Undo', run: () => setPhase.mutate({ phase: step.phase, at: before }) },
          });
        },
        onError: (err) => {
          const issue = err instanceof ApiError ? err.issues?.[0]?.message : undefined;
          setError(issue ?? (err instanceof Error ? err.message : 'Could not save the time.'));
        },
      },
    );
  };

  return (
    <View style={styles.edit}>
      <View style={styles.grow}>
        <Field
          label={step.label}
          value={value}
          onChangeText={(t) => {
            setTyped(t);
            setError(undefined);
          }}
          onSubmitEditing={save}
          placeholder="not marked"
          mono
          autoCapitalize="none"
          error={error}
          testID={`phase-time-${step.phase}`}
        />
      </View>
      <Button
        label="Save"
        tone="secondary"
        compact
        busy={setPhase.isPending}
        disabled={typed === null}
        onPress={save}
        testID={`phase-save-${step.phase}`}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  edit: { flexDirection: 'row', alignItems: 'flex-end', gap: space.sm },
  grow: { flex: 1 },
});
