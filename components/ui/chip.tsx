import { Pressable, StyleSheet } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Text } from './text';

type Props = {
  label: string;
  selected?: boolean;
  onPress?: () => void;
  color?: string;
  testID?: string;
  /** A chip that does something once (adds a tag) rather than switching on and off: a button to a screen reader. */
  action?: { accessibilityLabel: string };
};

export function Chip({ label, selected, onPress, color, testID, action }: Props) {
  const { colors } = useTheme();
  const tint = color ?? colors.accent;
  return (
    <Pressable
      testID={testID}
      onPress={onPress}
      disabled={!onPress}
      accessibilityRole={!onPress ? 'text' : action ? 'button' : 'checkbox'}
      accessibilityLabel={action?.accessibilityLabel}
      accessibilityState={onPress && !action ? { checked: !!selected } : undefined}
      aria-checked={onPress && !action ? !!selected : undefined}
      style={[styles.chip, { borderColor: selected ? tint : colors.border, backgroundColor: selected ? tint : colors.surfaceAlt }]}
    >
      <Text variant="caption" color={selected ? colors.bg : colors.text}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  chip: {
    borderWidth: 1,
    borderRadius: radius.pill,
    paddingHorizontal: space.md,
    paddingVertical: 4,
    minHeight: 28,
    justifyContent: 'center',
  },
});
