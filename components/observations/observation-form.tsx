import { useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useCampaign, useCampaignTags } from '@/hooks/campaigns';
import { useDraft } from '@/hooks/draft';
import { useCreateObservation } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { parseUtcInput, toUtcInput } from '@/lib/format';
import { observationCreateSchema, observationKinds, type Observation, type ObservationKind } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { kindLabels } from './kind-badge';
import { NoteView } from './note-view';

type Draft = { kind?: ObservationKind; title: string; time: string; depth: string; note: string; tags: string[] };

const blank = (): Draft => ({ title: '', time: toUtcInput(new Date().toISOString()), depth: '', note: '', tags: [] });

type Errors = Partial<Record<'kind' | 'title' | 'observedAt' | 'depth' | 'note' | 'tags' | 'form', string>>;

/** Turns the typed form into the create body, with the contract's own field messages. */
function toPayload(d: Draft): { ok: true; body: ReturnType<typeof observationCreateSchema.parse> } | { ok: false; errors: Errors } {
  const errors: Errors = {};
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
      const key = String(issue.path[0] ?? 'form') as keyof Errors;
      errors[key] ??= issue.message;
    }
  }
  if (Object.keys(errors).length > 0 || !parsed.success) return { ok: false, errors };
  return { ok: true, body: parsed.data };
}

type Props = { diveId: string; campaignId: string; onCreated: (o: Observation) => void };

export function ObservationForm({ diveId, campaignId, onCreated }: Props) {
  const { colors } = useTheme();
  const draft = useDraft<Draft>(`bathynote.draft.${diveId}`, blank);
  const d = draft.value;
  const [errors, setErrors] = useState<Errors>({});
  const [preview, setPreview] = useState(false);
  const [newTag, setNewTag] = useState('');
  const create = useCreateObservation(diveId);
  const tags = useCampaignTags(campaignId).data ?? [];
  const campaign = useCampaign(campaignId).data;

  const submit = () => {
    const result = toPayload(d);
    if (!result.ok) {
      setErrors(result.errors);
      return;
    }
    setErrors({});
    create.mutate(result.body, {
      onSuccess: (o) => {
        draft.clear();
        onCreated(o);
      },
      onError: (err) => {
        if (err instanceof ApiError && err.issues.length > 0) {
          const fromServer: Errors = {};
          for (const i of err.issues) fromServer[(i.path.split('.')[0] ?? 'form') as keyof Errors] ??= i.message;
          setErrors(fromServer);
        }
      },
    });
  };

  const toggleTag = (name: string) => draft.update({ tags: d.tags.includes(name) ? d.tags.filter((t) => t !== name) : [...d.tags, name] });
  const addFreeTag = () => {
    const name = newTag.trim();
    if (name && !d.tags.includes(name)) draft.update({ tags: [...d.tags, name] });
    setNewTag('');
  };
  const vocabulary = [...new Set([...tags.filter((t) => !t.retired).map((t) => t.name), ...d.tags])];

  const sendError =
    create.error instanceof ApiError && create.error.issues.length === 0
      ? create.error.isNetwork
        ? 'Not sent: no connection. Your entry is kept here; send it again when the link is back.'
        : create.error.message
      : undefined;

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
      <Segmented
        label="Kind"
        testID="field-kind"
        value={d.kind}
        onChange={(kind) => draft.update({ kind })}
        options={observationKinds.map((k) => ({ value: k, label: kindLabels[k], color: colors.kind[k] }))}
        error={errors.kind}
      />
      <Field
        label="Title"
        testID="field-title"
        value={d.title}
        onChangeText={(title) => draft.update({ title })}
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
            onChangeText={(time) => draft.update({ time })}
            mono
            error={errors.observedAt}
            hint={campaign ? `Seconds count; the campaign shows ${campaign.timeZone} beside UTC.` : undefined}
            autoCapitalize="none"
          />
        </View>
        <View style={styles.nowButton}>
          <Button
            label="Now"
            tone="secondary"
            testID="time-now"
            onPress={() => draft.update({ time: toUtcInput(new Date().toISOString()) })}
          />
        </View>
      </View>
      <Field
        label="Depth (m)"
        testID="field-depth"
        value={d.depth}
        onChangeText={(depth) => draft.update({ depth })}
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
            <View style={styles.nowButton}>
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
            onChangeText={(note) => draft.update({ note })}
            multiline
            placeholder="*Scientific names* in italics, lists with -, **bold**…"
            error={errors.note}
            onKeyPress={
              Platform.OS === 'web'
                ? (e) => {
                    const ev = e.nativeEvent as unknown as { key: string; ctrlKey?: boolean; metaKey?: boolean };
                    if (ev.key === 'Enter' && (ev.ctrlKey || ev.metaKey)) submit();
                  }
                : undefined
            }
          />
        )}
      </View>
      {sendError ? (
        <Text color={colors.danger} role="alert" testID="form-error">
          {sendError}
        </Text>
      ) : null}
      <Button label={create.isPending ? 'Saving…' : 'Save entry'} testID="save-observation" busy={create.isPending} onPress={submit} />
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: space.lg },
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: space.sm },
  flex: { flex: 1 },
  nowButton: { paddingBottom: 22 },
  block: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  preview: { borderWidth: 1, borderRadius: radius.md, padding: space.md, minHeight: 120 },
  notice: { flexDirection: 'row', alignItems: 'center', borderRadius: radius.md, paddingHorizontal: space.md },
});
