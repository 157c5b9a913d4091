import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { diveKeys, useUpdateDive } from '@/hooks/dives';
import { useTheme } from '@/hooks/theme';
import { formatUtc, parseUtcInput, toUtcInputExact } from '@/lib/format';
import type { Dive } from '@/lib/schemas';
import { FRAME_RATES, type FrameRateName } from '@/lib/timecode';
import { space } from '@/lib/tokens';

const rateNames = Object.keys(FRAME_RATES) as FrameRateName[];

type Form = { startAt: string; frameRate: string | null; gapS: string };

const formOf = (dive: Dive): Form => ({
  startAt: dive.recording.startAt ? toUtcInputExact(dive.recording.startAt) : '',
  frameRate: dive.recording.frameRate,
  gapS: String(dive.telemetryGapS),
});

/**
 * The dive's video clock (when the recording's first frame was taken and at what frame rate) and
 * how far apart two log samples may be before an entry between them gets no telemetry. The lead
 * and the pilot set them; everyone else reads them.
 */
export function RecordingSettings({ dive, mayEdit }: { dive: Dive; mayEdit: boolean }) {
  const { colors } = useTheme();
  const update = useUpdateDive(dive.id);
  const qc = useQueryClient();
  const [errors, setErrors] = useState<Partial<Record<keyof Form | 'form', string>>>({});
  const [saved, setSaved] = useState(false);
  // Only what this person typed is kept here, with the version it started from; until they type,
  // a save by someone else shows live, and once they have, a save by someone else is a conflict.
  const [draft, setDraft] = useState<{ form: Form; base: Form; version: number } | null>(null);
  const form = draft?.form ?? formOf(dive);
  const dirty = draft !== null;

  const change = (patch: Partial<Form>) => {
    setDraft((d) =>
      d ? { ...d, form: { ...d.form, ...patch } } : { form: { ...formOf(dive), ...patch }, base: formOf(dive), version: dive.version },
    );
    setSaved(false);
  };

  const save = () => {
    if (!draft) return;
    const next: typeof errors = {};
    const typed = form.startAt.trim();
    const startAt = typed === '' ? null : parseUtcInput(typed);
    if (typed !== '' && startAt === null) next.startAt = 'Type a UTC time like 2026-05-13 17:35:00, or leave it empty';
    const gap = Number(form.gapS.replace(',', '.'));
    if (!Number.isFinite(gap) || gap < 1 || gap > 3600) next.gapS = 'Give 1 to 3600 seconds';
    setErrors(next);
    if (Object.keys(next).length > 0) return;
    // Only what was changed goes out, so a field nobody touched keeps its exact stored value.
    const { base } = draft;
    const body = {
      version: draft.version,
      ...(form.startAt.trim() !== base.startAt.trim() ? { recordingStartAt: startAt } : {}),
      ...(form.frameRate !== base.frameRate ? { frameRate: form.frameRate } : {}),
      ...(form.gapS.trim() !== base.gapS.trim() ? { telemetryGapS: gap } : {}),
    };
    update.mutate(body, {
      onSuccess: () => {
        setDraft(null);
        setSaved(true);
      },
      onError: (err) => {
        if (err instanceof ApiError && err.status === 409) {
          setDraft(null);
          void qc.invalidateQueries({ queryKey: diveKeys.detail(dive.id) });
          setErrors({ form: 'Someone else changed this dive a moment ago; their settings are shown now. Make your change again.' });
        } else {
          setErrors({ form: err instanceof Error ? err.message : 'Could not save the settings.' });
        }
      },
    });
  };

  if (!mayEdit) {
    return (
      <View style={styles.wrap} testID="recording-settings">
        <Text variant="label">Video clock and telemetry gap</Text>
        <Text muted>
          {dive.recording.startAt && dive.recording.frameRate
            ? `Recording started ${formatUtc(dive.recording.startAt)} at ${dive.recording.frameRate} fps.`
            : 'The recording clock is not set, so entries show no video time code.'}{' '}
          Samples more than {dive.telemetryGapS} s apart leave a gap.
        </Text>
        <Text variant="caption" muted>
          Only the lead or the pilot can change these.
        </Text>
      </View>
    );
  }

  return (
    <View style={styles.wrap} testID="recording-settings">
      <Text variant="label">Video clock and telemetry gap</Text>
      <Text variant="caption" muted>
        With the recording’s first frame and its frame rate set, every entry shows its video time code and an entry can be logged by typing
        one.
      </Text>
      <Field
        label="Recording started (UTC)"
        value={form.startAt}
        onChangeText={(startAt) => change({ startAt })}
        hint="year-month-day hours:minutes:seconds, in UTC"
        mono
        autoCapitalize="none"
        error={errors.startAt}
        testID="recording-start"
      />
      <View style={styles.rates} role="radiogroup" aria-label="Frame rate">
        {rateNames.map((name) => (
          <Chip
            key={name}
            label={name}
            selected={form.frameRate === name}
            onPress={() => change({ frameRate: form.frameRate === name ? null : name })}
            testID={`frame-rate-${name.replace(/\W+/g, '-')}`}
          />
        ))}
      </View>
      <Text variant="caption" muted>
        DF is drop-frame: its time codes skip labels to keep step with the clock, and take a semicolon before the frames.
      </Text>
      <Field
        label="Largest gap between log samples (s)"
        value={form.gapS}
        onChangeText={(gapS) => change({ gapS })}
        inputMode="decimal"
        keyboardType="decimal-pad"
        mono
        hint="An entry between two samples further apart than this gets no telemetry rather than a guess."
        error={errors.gapS}
        testID="telemetry-gap"
      />
      {errors.form ? (
        <Text color={colors.danger} role="alert" testID="recording-error">
          {errors.form}
        </Text>
      ) : null}
      <View style={styles.actions}>
        <Button label="Save" onPress={save} busy={update.isPending} disabled={!dirty} testID="recording-save" />
        {saved ? (
          <Text variant="caption" muted testID="recording-saved">
            Saved; entries were stamped again where the gap changed.
          </Text>
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  rates: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  actions: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
