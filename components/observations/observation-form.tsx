import { useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useCampaign, useCampaignTags } from '@/hooks/campaigns';
import { useDraft } from '@/hooks/draft';
import { useLogEntry } from '@/hooks/outbox';
import { useTheme } from '@/hooks/theme';
import { parseUtcInput, toUtcInput } from '@/lib/format';
import { observationCreateSchema, observationKinds, type Observation, type ObservationCreate, type ObservationKind } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { kindLabels } from './kind-badge';
import { NoteView } from './note-view';

export type Draft = { kind?: ObservationKind; title: string; time: string; depth: string; note: string; tags: string[] };
export type FormErrors = Partial<Record<'kind' | 'title' | 'observedAt' | 'depth' | 'note' | 'tags' | 'form', string>>;

export const blankDraft = (): Draft => ({ title: '', time: toUtcInput(new Date().toISOString()), depth: '', note: '', tags: [] });

/** What the form shows for an existing entry; only a typed depth is editable as a number. */
export function draftFromObservation(o: Observation): Draft {
  return {
    kind: o.kind,
    title: o.title,
    time: toUtcInput(o.observedAt).concat(o.observedAt.slice(19, 23) === '.000' ? '' : o.observedAt.slice(19, 23)),
    depth: o.depthSource === 'manual' && o.depth != null ? String(o.depth) : '',
    note: o.note,
    tags: o.tags,
  };
}

/** Turns the typed form into a create body, with the contract's own field messages. */
export function toPayload(d: Draft): { ok: true; body: ObservationCreate & { observedAt: string } } | { ok: false; errors: FormErrors } {
  const errors: FormErrors = {};
  const observedAt = parseUtcInput(d.time);
  if (!observedAt) errors.observedAt = 'Type a UTC time like 2026-05-14 21:14:07';
  const depthText = d.depth.trim().replace(',', '.');
  const depth = depthText === '' ? null : Number(depthText);
  if (depth !== null && !Number.isFinite(depth)) errors.depth = 'Depth is a number of metres';
  if (!d.kind) errors.kind = 'Choose what kind of observation this is';
  const parsed = observationCreateSchema.safeParse({
    kind: d.kind,
    title: d.title,
    note: d.note,
    observedAt: observedAt ?? undefined,
    depth: depth !== null && Number.isFinite(depth) ? depth : null,
    tags: d.tags,
  });
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const key = String(issue.path[0] ?? 'form') as keyof FormErrors;
      errors[key] ??= issue.message;
    }
  }
  if (Object.keys(errors).length > 0 || !parsed.success || !observedAt) return { ok: false, errors };
  return { ok: true, body: { ...parsed.data, observedAt } };
}

export function errorsFromServer(err: unknown): FormErrors {
  const out: FormErrors = {};
  if (err instanceof ApiError) for (const i of err.issues) out[(i.path.split('.')[0] ?? 'form') as keyof FormErrors] ??= i.message;
  return out;
}

type FieldsProps = {
  campaignId: string;
  value: Draft;
  update: (patch: Partial<Draft>) => void;
  errors: FormErrors;
  onSubmit: () => void;
};

/** The fields of an entry, shared by logging a new one and editing one. */
export function ObservationFields({ campaignId, value: d, update, errors, onSubmit }: FieldsProps) {
  const { colors } = useTheme();
  const [preview, setPreview] = useState(false);
  const [newTag, setNewTag] = useState('');
  const tags = useCampaignTags(campaignId).data ?? [];
  const campaign = useCampaign(campaignId).data;
  const toggleTag = (name: string) => update({ tags: d.tags.includes(name) ? d.tags.filter((t) => t !== name) : [...d.tags, name] });
  const addFreeTag = () => {
    const name = newTag.trim();
    if (name && !d.tags.includes(name)) update({ tags: [...d.tags, name] });
    setNewTag('');
  };
  const vocabulary = [...new Set([...tags.filter((t) => !t.retired).map((t) => t.name), ...d.tags])];

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
            hint={campaign ? `Seconds count; the entry also shows ${campaign.timeZone} time.` : undefined}
            autoCapitalize="none"
          />
        </View>
        <View style={styles.buttonBeside}>
          <Button label="Now" tone="secondary" testID="time-now" onPress={() => update({ time: toUtcInput(new Date().toISOString()) })} />
        </View>
      </View>
      <Field
        label="Depth (m)"
        testID="field-depth"
        value={d.depth}
        onChangeText={(depth) => update({ depth })}
        inputMode="decimal"
        keyboardType="decimal-pad"
        mono
        placeholder="from telemetry when left empty"
        error={errors.depth}
      />
      <View style={styles.block}>
        <Text variant="label">Tags</Text>
        <View style={styles.chips}>
          {vocabulary.map((name) => (
            <Chip key={name} label={name} selected={d.tags.includes(name)} onPress={() => toggleTag(name)} testID={`tag-${name}`} />
          ))}
        </View>
        {campaign?.allowFreeTags ? (
          <View style={styles.row}>
            <View style={styles.flex}>
              <Field
                label="New tag"
                testID="field-new-tag"
                value={newTag}
                onChangeText={setNewTag}
                onSubmitEditing={addFreeTag}
                autoCapitalize="none"
              />
            </View>
            <View style={styles.buttonBeside}>
              <Button label="Add" tone="secondary" onPress={addFreeTag} />
            </View>
          </View>
        ) : null}
        {errors.tags ? (
          <Text variant="caption" color={colors.danger}>
            {errors.tags}
          </Text>
        ) : null}
      </View>
      <View style={styles.block}>
        <View style={styles.row}>
          <Text variant="label" style={styles.flex}>
            Note (Markdown)
          </Text>
          <Button
            label={preview ? 'Edit' : 'Preview'}
            tone="ghost"
            compact
            onPress={() => setPreview((p) => !p)}
            testID="note-preview-toggle"
          />
        </View>
        {preview ? (
          <View style={[styles.preview, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="note-preview">
            {d.note.trim() ? <NoteView markdown={d.note} /> : <Text muted>Nothing to preview.</Text>}
          </View>
        ) : (
          <Field
            label="Note"
            testID="field-note"
            value={d.note}
            onChangeText={(note) => update({ note })}
            multiline
            placeholder="*Scientific names* in italics, lists with -, **bold**…  (Ctrl+Enter saves)"
            error={errors.note}
            onKeyPress={
              Platform.OS === 'web'
                ? (e) => {
                    const ev = e.nativeEvent as unknown as { key: string; ctrlKey?: boolean; metaKey?: boolean };
                    if (ev.key === 'Enter' && (ev.ctrlKey || ev.metaKey)) onSubmit();
                  }
                : undefined
            }
          />
        )}
      </View>
    </>
  );
}

type NewProps = { diveId: string; campaignId: string; onCreated: (o: Observation | null) => void };

/**
 * Logging a new entry. The draft survives a reload; a send that cannot reach the server is kept
 * on the device and sent later (shown as waiting in the dive log), so nothing typed is lost.
 */
export function NewObservationForm({ diveId, campaignId, onCreated }: NewProps) {
  const { colors } = useTheme();
  const toast = useToast();
  const draft = useDraft<Draft>(`bathynote.draft.${diveId}`, blankDraft);
  const [errors, setErrors] = useState<FormErrors>({});
  const [sending, setSending] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const log = useLogEntry(diveId);

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
      if (sent.queued) toast('No link to the server: the entry is kept on this device and will be sent.', { tone: 'danger' });
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
      <ObservationFields campaignId={campaignId} value={draft.value} update={draft.update} errors={errors} onSubmit={() => void submit()} />
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
  notice: { flexDirection: 'row', alignItems: 'center', borderRadius: radius.md, paddingHorizontal: space.md },
  flex: { flex: 1 },
});

const styles = StyleSheet.create({
  ...formStyles,
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: space.sm },
  buttonBeside: { paddingBottom: 22 },
  block: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  preview: { borderWidth: 1, borderRadius: radius.md, padding: space.md, minHeight: 120 },
});
