import { useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';
import { useQueryClient } from '@tanstack/react-query';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { TimecodeEntry } from '@/components/telemetry/timecode-entry';
import { useCampaign } from '@/hooks/campaigns';
import { diveQuery, useDive } from '@/hooks/dives';
import { useDraft } from '@/hooks/draft';
import { useLayout } from '@/hooks/layout';
import { onceLeftQueue, useLogEntry } from '@/hooks/send-queue';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { isOutsideDive } from '@/lib/dive-window';
import { formatInZone, formatUtc, parseUtcInput, toUtcInput, toUtcInputExact } from '@/lib/format';
import { observationKinds, type Dive, type Observation } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { blankDraft, errorsAfterChange, toPayload, type Draft, type FormErrors } from './entry-draft';
import { kindLabels } from './kind-badge';
import { NoteView } from './note-view';
import { TagInput } from './tag-input';

export function errorsFromServer(err: unknown): FormErrors {
  const out: FormErrors = {};
  if (err instanceof ApiError) for (const i of err.issues) out[(i.path.split('.')[0] ?? 'form') as keyof FormErrors] ??= i.message;
  return out;
}

type FieldsProps = {
  campaignId: string;
  /** The entry being edited: each measured value's field says where the value came from. */
  editing?: Observation;
  /** The entry's dive: once its recording clock is set, the time can be typed as a video time code. */
  diveId: string;
  value: Draft;
  update: (patch: Partial<Draft>) => void;
  errors: FormErrors;
  onSubmit: () => void;
};

/** The fields of an entry, shared by logging a new one and editing one. */
const shown = (n: number | null | undefined) => (n == null ? '' : String(n));

/**
 * Under a measured value in the edit form: where the value shown came from. `typed` and
 * `stored` are the field(s) as shown now and as the entry has them.
 */
function sourceHint(typed: string[], stored: (number | null)[], source: Observation['depthSource']): string {
  const unchanged = typed.every((t, i) => t.trim() === shown(stored[i]));
  if (!unchanged) return typed.every((t) => t.trim() === '') ? 'Left empty, it comes from the telemetry log.' : 'Typed by hand.';
  if (source === 'telemetry') return 'From the telemetry log. Type over it to set it by hand.';
  if (source === 'manual') return 'Typed by hand. Empty it to take the telemetry log’s value.';
  return 'No value yet, and none in the telemetry log.';
}

export function ObservationFields({ campaignId, diveId, editing, value: d, update, errors, onSubmit }: FieldsProps) {
  const { colors } = useTheme();
  const { previewBeside } = useLayout();
  const [preview, setPreview] = useState(false);
  const campaign = useCampaign(campaignId).data;
  const dive = useDive(diveId).data;
  const noteField = (
    <Field
      label="Note"
      testID="field-note"
      value={d.note}
      onChangeText={(note) => update({ note })}
      multiline
      placeholder="*Scientific names* in italics, lists with -, **bold**…  (Ctrl+Enter saves)"
      error={errors.note}
      style={previewBeside ? styles.noteBeside : undefined}
      onKeyPress={
        Platform.OS === 'web'
          ? (e) => {
              const ev = e.nativeEvent as unknown as { key: string; ctrlKey?: boolean; metaKey?: boolean };
              if (ev.key === 'Enter' && (ev.ctrlKey || ev.metaKey)) onSubmit();
            }
          : undefined
      }
    />
  );
  const notePreview = (
    <View
      style={[styles.preview, previewBeside && styles.previewBeside, { borderColor: colors.border, backgroundColor: colors.surface }]}
      testID="note-preview"
      aria-live="polite"
    >
      {d.note.trim() ? <NoteView markdown={d.note} /> : <Text muted>Nothing to preview.</Text>}
    </View>
  );

  return (
    <>
      <Segmented
        label="Kind"
        testID="field-kind"
        value={d.kind}
        onChange={(kind) => update({ kind })}
        options={observationKinds.map((k) => ({ value: k, label: kindLabels[k], color: colors.kind[k] }))}
        error={errors.kind}
      />
      <Field
        label="Title"
        testID="field-title"
        value={d.title}
        onChangeText={(title) => update({ title })}
        placeholder="What did you see?"
        error={errors.title}
        maxLength={200}
      />
      <View style={styles.row}>
        <View style={styles.flex}>
          <Field
            label="Time (UTC)"
            testID="field-time"
            value={d.time}
            onChangeText={(time) => update({ time })}
            mono
            error={errors.observedAt}
            hint={timeHint(d.time, campaign?.timeZone)}
            autoCapitalize="none"
          />
        </View>
        <View style={styles.buttonBeside}>
          <Button label="Now" tone="secondary" testID="time-now" onPress={() => update({ time: toUtcInput(new Date().toISOString()) })} />
        </View>
      </View>
      {dive ? <DiveWindowNote dive={dive} typed={d.time} /> : null}
      {dive ? <TimecodeEntry dive={dive} onTime={(iso) => update({ time: toUtcInputExact(iso) })} /> : null}
      <Field
        label="Depth (m)"
        testID="field-depth"
        value={d.depth}
        onChangeText={(depth) => update({ depth })}
        inputMode="decimal"
        keyboardType="decimal-pad"
        mono
        placeholder={editing ? undefined : 'from telemetry when left empty'}
        hint={editing ? sourceHint([d.depth], [editing.depth], editing.depthSource) : undefined}
        error={errors.depth}
      />
      <View style={styles.block}>
        <Text variant="label">Position (decimal degrees, WGS 84)</Text>
        <View style={styles.row}>
          <View style={styles.flex}>
            <Field
              label="Latitude"
              testID="field-lat"
              value={d.lat}
              onChangeText={(lat) => update({ lat })}
              // A decimal keypad on iOS has no minus key, and south and west are negative.
              keyboardType="numbers-and-punctuation"
              mono
              placeholder={editing ? undefined : 'from telemetry'}
              error={errors.lat}
            />
          </View>
          <View style={styles.flex}>
            <Field
              label="Longitude"
              testID="field-lon"
              value={d.lon}
              onChangeText={(lon) => update({ lon })}
              // A decimal keypad on iOS has no minus key, and south and west are negative.
              keyboardType="numbers-and-punctuation"
              mono
              placeholder={editing ? undefined : 'from telemetry'}
              error={errors.lon}
            />
          </View>
        </View>
        <Text variant="caption" muted testID="position-source">
          {editing
            ? `${sourceHint([d.lat, d.lon], [editing.lat, editing.lon], editing.positionSource)} South and west are negative.`
            : 'South and west are negative. Left empty, both come from telemetry.'}
        </Text>
      </View>
      <Field
        label="Water temperature (°C)"
        testID="field-temperature"
        value={d.temperature}
        onChangeText={(temperature) => update({ temperature })}
        keyboardType="numbers-and-punctuation"
        mono
        placeholder={editing ? undefined : 'from telemetry when left empty'}
        hint={editing ? sourceHint([d.temperature], [editing.temperature], editing.temperatureSource) : undefined}
        error={errors.temperature}
      />
      <TagInput campaignId={campaignId} value={d.tags} onChange={(tags) => update({ tags })} error={errors.tags} />
      <View style={styles.block}>
        <View style={styles.row}>
          <Text variant="label" style={styles.flex}>
            Note (Markdown)
          </Text>
          {previewBeside ? (
            <Text variant="caption" muted>
              Preview beside, as you type
            </Text>
          ) : (
            <Button
              label={preview ? 'Edit' : 'Preview'}
              tone="ghost"
              compact
              onPress={() => setPreview((p) => !p)}
              testID="note-preview-toggle"
            />
          )}
        </View>
        {previewBeside ? (
          <View style={styles.sideBySide}>
            <View style={styles.flex}>{noteField}</View>
            <View style={styles.flex}>
              <Text variant="label">Preview</Text>
              {notePreview}
            </View>
          </View>
        ) : preview ? (
          notePreview
        ) : (
          noteField
        )}
      </View>
    </>
  );
}

/**
 * Below the time: when the dive is not under way, its window (so a time is typed for the right
 * day), and a warning once the typed time falls outside it. The entry is still taken, marked
 * "outside the dive" in the log: logging from the video after the dive is real work.
 */
function DiveWindowNote({ dive, typed }: { dive: Dive; typed: string }) {
  const { colors } = useTheme();
  const at = parseUtcInput(typed);
  const outside = at !== null && isOutsideDive(dive, at);
  const { launch, onDeck } = dive.phases;
  const span = launch
    ? `launched ${formatUtc(launch)}${onDeck ? `, on deck ${formatUtc(onDeck)}` : ', still under way'}`
    : dive.plannedStartAt
      ? `planned to start ${formatUtc(dive.plannedStartAt)}`
      : null;
  if (!outside && (!span || (launch && !onDeck))) return null;
  return (
    <Text
      variant="caption"
      color={outside ? colors.warning : colors.textMuted}
      role={outside ? 'alert' : undefined}
      testID={outside ? 'time-outside-dive' : 'dive-window'}
    >
      {outside
        ? `This time is outside dive ${dive.number} (${span ?? 'no times yet'}). The entry will be kept and marked “outside the dive”; check the date.`
        : `Dive ${dive.number}: ${span}.`}
    </Text>
  );
}

type NewProps = { diveId: string; campaignId: string; onCreated: (o: Observation | null) => void };

/** Under the UTC time as it is typed: the same instant in the campaign's display zone. */
function timeHint(typed: string, zone: string | undefined): string | undefined {
  if (!zone) return undefined;
  const at = parseUtcInput(typed);
  if (!at) return `UTC, with seconds; the entry also shows ${zone} time.`;
  return zone === 'UTC' ? 'UTC, with seconds.' : `= ${formatInZone(at, zone)} (${zone})`;
}

/**
 * Logging a new entry. The draft survives a reload; a send that cannot reach the server is kept
 * on the device and sent later (shown as waiting in the dive log), so nothing typed is lost.
 */
export function NewObservationForm({ diveId, campaignId, onCreated }: NewProps) {
  const { colors } = useTheme();
  const toast = useToast();
  // Kept per person as well as per dive: a shared screen never shows one person's draft to the next.
  const me = useMe();
  // The dive as it is whenever the form starts afresh (also after a send): under way, the time is now.
  const qc = useQueryClient();
  const draft = useDraft<Draft>(`bathynote.draft.${me.data?.user.id ?? 'anyone'}.${diveId}`, () =>
    blankDraft(qc.getQueryData(diveQuery(diveId).queryKey)),
  );
  const [errors, setErrors] = useState<FormErrors>({});
  const [sending, setSending] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const log = useLogEntry(diveId);
  const update = (patch: Partial<Draft>) => {
    draft.update(patch);
    setErrors((shown) => errorsAfterChange(shown, Object.keys(patch) as (keyof Draft)[], { ...draft.value, ...patch }));
  };

  const submit = async () => {
    if (sending) return;
    const result = toPayload(draft.value);
    if (!result.ok) {
      setErrors(result.errors);
      return;
    }
    setErrors({});
    setFailure(null);
    setSending(true);
    try {
      const sent = await log(result.body);
      draft.clear();
      if (sent.queued)
        toast('No link to the server: the entry is kept on this device and will be sent.', {
          tone: 'danger',
          until: (close) => onceLeftQueue(sent.clientRef, close),
        });
      onCreated(sent.queued ? null : sent.observation);
    } catch (err) {
      const fromServer = errorsFromServer(err);
      setErrors(fromServer);
      if (Object.keys(fromServer).length === 0) setFailure(err instanceof Error ? err.message : 'Could not save the entry.');
    } finally {
      setSending(false);
    }
  };

  return (
    <View style={styles.form} testID="observation-form">
      {draft.wasRestored ? (
        <View style={[styles.notice, { backgroundColor: colors.surfaceAlt }]}>
          <Text variant="caption" style={styles.flex}>
            Your unsent draft was restored.
          </Text>
          <Button label="Discard draft" tone="ghost" compact onPress={draft.clear} testID="discard-draft" />
        </View>
      ) : null}
      <ObservationFields
        campaignId={campaignId}
        diveId={diveId}
        value={draft.value}
        update={update}
        errors={errors}
        onSubmit={() => void submit()}
      />
      {failure ? (
        <Text color={colors.danger} role="alert" testID="form-error">
          {failure}
        </Text>
      ) : null}
      <Button label={sending ? 'Saving…' : 'Save entry'} testID="save-observation" busy={sending} onPress={() => void submit()} />
    </View>
  );
}

export const formStyles = StyleSheet.create({
  form: { gap: space.lg },
  actions: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  notice: { flexDirection: 'row', alignItems: 'center', borderRadius: radius.md, paddingHorizontal: space.md },
  flex: { flex: 1 },
});

const styles = StyleSheet.create({
  ...formStyles,
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: space.sm },
  buttonBeside: { paddingBottom: 22 },
  block: { gap: space.sm },
  preview: { borderWidth: 1, borderRadius: radius.md, padding: space.md, minHeight: 120 },
  sideBySide: { flexDirection: 'row', gap: space.md, alignItems: 'stretch' },
  noteBeside: { minHeight: 220 },
  previewBeside: { minHeight: 220, marginTop: space.xs, flexGrow: 1 },
});
