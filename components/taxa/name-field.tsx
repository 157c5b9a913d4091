import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useNameSuggestions } from '@/hooks/taxa';
import { useTheme } from '@/hooks/theme';
import type { NameSuggestion } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

type Props = {
  campaignId: string;
  value: string;
  onChange: (name: string) => void;
  /** A suggestion taken: its rank and identifier may fill the form's other fields. */
  onPick?: (s: NameSuggestion) => void;
  error?: string;
  testID?: string;
};

/**
 * The scientific name, with names from the campaign's species list and names already used in the
 * campaign offered as one types (arrow keys and Enter on a keyboard). A name outside the list is
 * allowed, and said to be outside it.
 */
export function NameField({ campaignId, value, onChange, onPick, error, testID = 'field-scientific-name' }: Props) {
  const { colors } = useTheme();
  const [focused, setFocused] = useState(false);
  const [active, setActive] = useState(0);
  const suggestions = useNameSuggestions(campaignId, value);
  const items = (suggestions.data?.items ?? []).filter((s) => s.scientificName.toLowerCase() !== value.trim().toLowerCase());
  const exact = suggestions.data?.items.find((s) => s.scientificName.toLowerCase() === value.trim().toLowerCase());
  const outside = !!suggestions.data?.hasChecklist && value.trim().length >= 2 && !suggestions.isFetching && !exact?.onChecklist;
  const open = focused && items.length > 0;
  const take = (s: NameSuggestion) => {
    onChange(s.scientificName);
    onPick?.(s);
    setActive(0);
  };
  return (
    <View style={styles.wrap}>
      <Field
        label="Scientific name"
        testID={testID}
        value={value}
        onChangeText={(t) => {
          onChange(t);
          setActive(0);
        }}
        onFocus={() => setFocused(true)}
        // Leaving the field a moment later lets a tap on a suggestion land first.
        onBlur={() => setTimeout(() => setFocused(false), 150)}
        onKeyPress={(e) => {
          const key = e.nativeEvent.key;
          if (!open) return;
          if (key === 'ArrowDown') setActive((a) => Math.min(a + 1, items.length - 1));
          else if (key === 'ArrowUp') setActive((a) => Math.max(a - 1, 0));
          else if (key === 'Enter' && items[active]) {
            e.preventDefault();
            take(items[active]);
          } else if (key === 'Escape') setFocused(false);
        }}
        autoCapitalize="sentences"
        autoCorrect={false}
        error={error}
        hint={outside ? 'Not on the campaign’s species list: check the spelling, or keep it if it is a new record.' : undefined}
        aria-autocomplete="list"
        aria-expanded={open}
      />
      {outside ? (
        <Text variant="caption" color={colors.warning} testID="name-outside-list">
          Outside the species list
        </Text>
      ) : null}
      {open ? (
        <View
          style={[styles.list, { borderColor: colors.border, backgroundColor: colors.surface }]}
          accessibilityRole="list"
          testID="name-suggestions"
        >
          {items.map((s, i) => (
            <Pressable
              key={s.scientificName}
              role="option"
              aria-selected={i === active}
              onPress={() => take(s)}
              testID={`name-suggestion-${s.scientificName}`}
              style={[styles.item, i === active && { backgroundColor: colors.surfaceAlt }]}
            >
              <Text style={styles.italic}>{s.scientificName}</Text>
              <Text variant="caption" muted>
                {[s.authorship, s.vernacularName, s.onChecklist ? 'species list' : `used ${s.uses}×, not on the list`]
                  .filter(Boolean)
                  .join(' · ')}
              </Text>
            </Pressable>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  list: { borderWidth: 1, borderRadius: radius.md, overflow: 'hidden' },
  item: { paddingVertical: space.sm, paddingHorizontal: space.md, minHeight: 44, justifyContent: 'center' },
  italic: { fontStyle: 'italic' },
});
