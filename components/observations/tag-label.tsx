import { Pressable, StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { radius, space, tagColors } from '@/lib/tokens';

type Props = { name: string; onRemove?: () => void; testID?: string };

/**
 * A tag in its own colour, always written out with its "#" so that the name, not the colour,
 * says which tag it is. With `onRemove` it carries a button that takes it off the entry.
 */
export function TagLabel({ name, onRemove, testID }: Props) {
  const { scheme } = useTheme();
  const { fg, bg } = tagColors(name, scheme);
  return (
    <View style={[styles.tag, { backgroundColor: bg, borderColor: fg }]} testID={testID}>
      <Text variant="caption" color={fg}>
        #{name}
      </Text>
      {onRemove ? (
        <Pressable
          onPress={onRemove}
          accessibilityRole="button"
          accessibilityLabel={`Remove tag ${name}`}
          hitSlop={10}
          style={styles.remove}
          testID={testID ? `${testID}-remove` : undefined}
        >
          <Text variant="label" color={fg}>
            ×
          </Text>
        </Pressable>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  tag: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.xs,
    borderWidth: 1,
    borderRadius: radius.pill,
    paddingHorizontal: space.sm,
    paddingVertical: 2,
    minHeight: 24,
  },
  remove: { paddingHorizontal: 2 },
});
