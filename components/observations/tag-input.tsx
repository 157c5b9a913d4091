import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useCampaign, useCampaignTags } from '@/hooks/campaigns';
import { useTheme } from '@/hooks/theme';
import { observationCreateSchema, type Tag } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { TagLabel } from './tag-label';

/** How many suggestions show before anything is typed; typing narrows the whole vocabulary. */
const SHOWN_UNTYPED = 12;
const tagName = observationCreateSchema.shape.tags.unwrap().element;

/**
 * The campaign's tags matching what is typed: names that start with it first, then names that
 * contain it; before anything is typed, the most used. Retired and already chosen tags are left out.
 */
export function suggestTags(vocabulary: Tag[], chosen: string[], typed: string): Tag[] {
  const q = typed.trim().replace(/^#+/, '').toLowerCase();
  const taken = new Set(chosen.map((t) => t.toLowerCase()));
  const open = vocabulary.filter((t) => !t.retired && !taken.has(t.name.toLowerCase()));
  if (!q) return [...open].sort((a, b) => b.usage - a.usage || a.name.localeCompare(b.name));
  const starts = open.filter((t) => t.name.toLowerCase().startsWith(q));
  const contains = open.filter((t) => !t.name.toLowerCase().startsWith(q) && t.name.toLowerCase().includes(q));
  return [...starts, ...contains];
}

type Props = { campaignId: string; value: string[]; onChange: (tags: string[]) => void; error?: string };

/**
 * Tags as chips with a typing box: suggestions come from the campaign's vocabulary; Enter or a tap
 * adds one. A tag outside the vocabulary is accepted only when the campaign allows free tags,
 * which is also the rule the server applies.
 */
export function TagInput({ campaignId, value, onChange, error }: Props) {
  const { colors } = useTheme();
  const vocabulary = useCampaignTags(campaignId).data ?? [];
  const allowFree = useCampaign(campaignId).data?.allowFreeTags ?? false;
  const [typed, setTyped] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const suggestions = suggestTags(vocabulary, value, typed);
  const shown = typed.trim() ? suggestions : suggestions.slice(0, SHOWN_UNTYPED);

  const add = (name: string) => {
    if (!value.some((t) => t.toLowerCase() === name.toLowerCase())) onChange([...value, name]);
    setTyped('');
    setProblem(null);
  };
  const submit = () => {
    const text = typed.trim().replace(/^#+/, '').trim();
    if (!text) return;
    const known = vocabulary.find((t) => !t.retired && t.name.toLowerCase() === text.toLowerCase());
    if (known) return add(known.name);
    if (value.some((t) => t.toLowerCase() === text.toLowerCase())) return setTyped('');
    if (suggestions[0]) return add(suggestions[0].name);
    addNew(text);
  };
  /** A tag outside the vocabulary, where the campaign takes them: Enter when nothing matches, or its own chip. */
  const addNew = (text: string) => {
    if (!allowFree) {
      setProblem(`"${text}" is not in this campaign's vocabulary, and the campaign takes no new tags. A lead can add it.`);
      return;
    }
    const checked = tagName.safeParse(text);
    if (!checked.success) {
      setProblem(checked.error.issues[0]?.message ?? 'Not a usable tag');
      return;
    }
    add(checked.data);
  };
  const remaining = suggestions.length - shown.length;
  const typedName = typed.trim().replace(/^#+/, '').trim();
  const newTag = allowFree && typedName && !vocabulary.some((t) => t.name.toLowerCase() === typedName.toLowerCase()) ? typedName : null;

  return (
    <View style={styles.wrap} testID="tag-input">
      <Text variant="label">Tags</Text>
      {value.length > 0 ? (
        <View style={styles.chips} testID="chosen-tags">
          {value.map((t) => (
            <TagLabel key={t} name={t} onRemove={() => onChange(value.filter((x) => x !== t))} testID={`chosen-tag-${t}`} />
          ))}
        </View>
      ) : null}
      <Field
        label="Add a tag"
        testID="field-tag"
        value={typed}
        onChangeText={(t) => {
          setTyped(t);
          setProblem(null);
        }}
        onSubmitEditing={submit}
        submitBehavior="submit"
        blurOnSubmit={false}
        autoCapitalize="none"
        autoCorrect={false}
        placeholder={allowFree ? 'Type to find a tag, or a new one' : 'Type to find a tag'}
        error={problem ?? error}
        hint={typed.trim() && suggestions.length === 0 && allowFree ? 'Enter adds it as a new tag.' : 'Enter adds the first suggestion.'}
      />
      {shown.length > 0 ? (
        <View style={styles.chips} testID="tag-suggestions">
          {newTag ? (
            <Chip
              label={`+ new "${newTag}"`}
              onPress={() => addNew(newTag)}
              action={{ accessibilityLabel: `Add a new tag, ${newTag}` }}
              testID="new-tag-chip"
            />
          ) : null}
          {shown.map((t) => (
            <Chip
              key={t.id}
              label={`+ ${t.name}`}
              onPress={() => add(t.name)}
              action={{ accessibilityLabel: `Add tag ${t.name}` }}
              testID={`tag-${t.name}`}
            />
          ))}
          {remaining > 0 ? (
            <Text variant="caption" muted>
              {remaining} more: type to narrow
            </Text>
          ) : null}
        </View>
      ) : typed.trim() ? (
        <Text variant="caption" color={allowFree ? colors.textMuted : colors.warning}>
          No tag in the vocabulary matches.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
