import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import {
  useCampaign,
  useCampaignTags,
  useCreateQuickMark,
  useCreateTag,
  useQuickMarks,
  useRetireQuickMark,
  useUpdateQuickMark,
  useUpdateTag,
} from '@/hooks/campaigns';
import { useTheme } from '@/hooks/theme';
import { can } from '@/lib/permissions';
import { observationKinds, SAMPLE_TAG, type ObservationKind, type QuickMark, type Tag } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { kindLabels } from '../observations/kind-badge';
import { TagInput } from '../observations/tag-input';

/** The lead's tools for the campaign's words: the tag vocabulary and the quick marks. */
export function VocabularySettings({ campaignId }: { campaignId: string }) {
  const campaign = useCampaign(campaignId);
  if (campaign.isPending) return <LoadingState />;
  if (campaign.isError) return <ErrorState error={campaign.error} />;
  const isLead = can(campaign.data.myRole, 'vocabulary.manage');
  return (
    <View style={styles.wrap}>
      {isLead ? null : <Text muted>Only a campaign lead changes the vocabulary and the quick marks.</Text>}
      <QuickMarks campaignId={campaignId} editable={isLead} />
      <Tags campaignId={campaignId} editable={isLead} />
    </View>
  );
}

function QuickMarks({ campaignId, editable }: { campaignId: string; editable: boolean }) {
  const { colors } = useTheme();
  const marks = useQuickMarks(campaignId).data ?? [];
  const create = useCreateQuickMark(campaignId);
  const change = useUpdateQuickMark(campaignId);
  const retire = useRetireQuickMark(campaignId);
  const [label, setLabel] = useState('');
  const [kind, setKind] = useState<ObservationKind>('biology');
  const [tags, setTags] = useState<string[]>([]);
  // The quick mark being changed, if the form holds one rather than a new one.
  const [editing, setEditing] = useState<QuickMark | null>(null);
  const reset = () => {
    setEditing(null);
    setLabel('');
    setKind('biology');
    setTags([]);
  };
  const edit = (m: QuickMark) => {
    setEditing(m);
    setLabel(m.label);
    setKind(m.kind);
    setTags(m.tags);
  };
  const save = () => {
    const input = { label: label.trim(), kind, tags };
    if (editing) change.mutate({ id: editing.id, ...input }, { onSuccess: reset });
    else create.mutate(input, { onSuccess: reset });
  };
  const failure = editing ? change.error : create.error;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="quick-mark-settings">
      <Text variant="title">Quick marks</Text>
      <Text variant="caption" muted>
        One tap in the dive log logs an entry now with this title, kind and tags; the author completes it later.
      </Text>
      <View style={styles.chips}>
        {marks.length === 0 ? <Text muted>None yet.</Text> : null}
        {marks.map((m) => (
          <View key={m.id} style={styles.item}>
            <Chip label={`${m.label}${m.tags.length ? ` · #${m.tags.join(' #')}` : ''}`} color={colors.kind[m.kind]} selected />
            {editable ? (
              <>
                <Button label="Edit" tone="ghost" compact onPress={() => edit(m)} testID={`edit-quick-mark-${m.label}`} />
                <Button label="Remove" tone="ghost" compact onPress={() => retire.mutate(m.id)} />
              </>
            ) : null}
          </View>
        ))}
      </View>
      {editable ? (
        <View style={styles.form}>
          {editing ? <Text variant="label">Changing “{editing.label}”</Text> : null}
          <Field label="Label" testID="field-quick-mark-label" value={label} onChangeText={setLabel} hint="What the chip says, short" />
          <Segmented
            label="Kind"
            value={kind}
            onChange={setKind}
            testID="field-quick-mark-kind"
            options={observationKinds.map((k) => ({ value: k, label: kindLabels[k], color: colors.kind[k] }))}
          />
          <TagInput campaignId={campaignId} value={tags} onChange={setTags} />
          {failure instanceof ApiError ? <Text color={colors.danger}>{failure.message}</Text> : null}
          <View style={styles.chips}>
            <Button
              label={editing ? 'Save quick mark' : 'Add quick mark'}
              testID="add-quick-mark"
              busy={create.isPending || change.isPending}
              disabled={!label.trim()}
              onPress={save}
            />
            {editing ? <Button label="Cancel" tone="ghost" onPress={reset} testID="cancel-quick-mark" /> : null}
          </View>
        </View>
      ) : null}
    </View>
  );
}

function Tags({ campaignId, editable }: { campaignId: string; editable: boolean }) {
  const { colors } = useTheme();
  const tags = useCampaignTags(campaignId).data ?? [];
  const create = useCreateTag(campaignId);
  const [name, setName] = useState('');
  const [selected, setSelected] = useState<Tag | null>(null);
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="tag-settings">
      <Text variant="title">Tag vocabulary</Text>
      <Text variant="caption" muted>
        Each tag with the number of entries that carry it.{editable ? ' Tap a tag to rename, merge or retire it.' : ''}
      </Text>
      <View style={styles.chips}>
        {tags.map((t) => (
          <Chip
            key={t.id}
            label={`${t.name} · ${entries(t.usage)}${t.retired ? ' · retired' : ''}`}
            selected={selected?.id === t.id}
            onPress={editable ? () => setSelected(selected?.id === t.id ? null : t) : undefined}
            action={editable ? { accessibilityLabel: `Rename, merge or retire the tag ${t.name}` } : undefined}
            testID={`vocab-${t.name}`}
          />
        ))}
      </View>
      {editable && selected ? (
        <TagEditor key={selected.id} tag={selected} tags={tags} campaignId={campaignId} onDone={() => setSelected(null)} />
      ) : null}
      {editable ? (
        <View style={styles.form}>
          <Field
            label="New tag"
            testID="field-vocab-new"
            value={name}
            onChangeText={setName}
            autoCapitalize="none"
            error={create.error instanceof ApiError ? create.error.message : undefined}
          />
          <Button
            label="Add tag"
            testID="add-tag"
            busy={create.isPending}
            disabled={!name.trim()}
            onPress={() => create.mutate(name.trim(), { onSuccess: () => setName('') })}
          />
        </View>
      ) : null}
    </View>
  );
}

function TagEditor({ tag, tags, campaignId, onDone }: { tag: Tag; tags: Tag[]; campaignId: string; onDone: () => void }) {
  const { colors } = useTheme();
  const update = useUpdateTag(campaignId);
  const [name, setName] = useState(tag.name);
  const [mergeInto, setMergeInto] = useState<string | null>(null);
  const run = (input: { name?: string; retired?: boolean; mergeInto?: string }) =>
    update.mutate({ id: tag.id, ...input }, { onSuccess: onDone });
  if (tag.name.toLowerCase() === SAMPLE_TAG) {
    return (
      <View style={[styles.editor, { borderColor: colors.border }]}>
        <Text muted testID="reserved-tag">
          “{tag.name}” marks the entries whose samples are kept in custody, so it stays as it is. Merge other tags into it instead.
        </Text>
      </View>
    );
  }
  const target = tags.find((t) => t.id === mergeInto);
  return (
    <View style={[styles.editor, { borderColor: colors.border }]} testID="tag-editor">
      <Text variant="label" testID="tag-editor-title">
        “{tag.name}” · on {entries(tag.usage)}
        {tag.retired ? ' · retired' : ''}
      </Text>
      <Field
        label="Rename"
        value={name}
        onChangeText={setName}
        autoCapitalize="none"
        hint={`Every entry with “${tag.name}” shows the new name.`}
        testID="tag-rename-field"
      />
      <View style={styles.chips}>
        <Button
          label="Rename"
          tone="secondary"
          compact
          disabled={!name.trim() || name === tag.name}
          onPress={() => run({ name: name.trim() })}
          testID="tag-rename"
        />
        <Button
          label={tag.retired ? 'Bring back' : 'Retire'}
          tone="secondary"
          compact
          onPress={() => run({ retired: !tag.retired })}
          testID="tag-retire"
        />
        <Button label="Close" tone="ghost" compact onPress={onDone} testID="tag-editor-close" />
      </View>
      <Text variant="caption" muted>
        {tag.retired
          ? 'Retired: its entries keep it, but it is no longer offered when logging.'
          : 'Retiring keeps the tag on its entries but stops offering it when logging.'}
      </Text>
      <Text variant="label">Merge into another tag</Text>
      <View style={styles.chips}>
        {tags
          .filter((t) => t.id !== tag.id && !t.retired)
          .map((t) => (
            <Chip
              key={t.id}
              label={t.name}
              selected={mergeInto === t.id}
              onPress={() => setMergeInto(mergeInto === t.id ? null : t.id)}
              testID={`tag-merge-into-${t.name}`}
            />
          ))}
      </View>
      {target ? (
        <View style={styles.chips}>
          <Text variant="caption">
            The {entries(tag.usage)} with “{tag.name}” take “{target.name}” instead, and “{tag.name}” goes.
          </Text>
          <Button
            label={`Merge into “${target.name}”`}
            tone="danger"
            compact
            busy={update.isPending}
            onPress={() => run({ mergeInto: target.id })}
            testID="tag-merge"
          />
        </View>
      ) : null}
      {update.error instanceof ApiError ? <Text color={colors.danger}>{update.error.message}</Text> : null}
    </View>
  );
}

/** "1 entry", "12 entries". */
const entries = (n: number) => (n === 1 ? '1 entry' : `${n.toLocaleString('en')} entries`);

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  item: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  form: { gap: space.md },
  editor: { borderTopWidth: StyleSheet.hairlineWidth, paddingTop: space.md, gap: space.sm },
});
