import { Pressable, StyleSheet } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Text } from './text';

type Props = { label: string; selected?: boolean; onPress?: () => void; color?: string; testID?: string };

export function Chip({ label, selected, onPress, color, testID }: Props) {
  const { colors } = useTheme();
  const tint = color ?? colors.accent;
  return (
    <Pressable
      testID={testID}
      onPress={onPress}
      disabled={!onPress}
      accessibilityRole={onPress ? 'checkbox' : 'text'}
      accessibilityState={onPress ? { checked: !!selected } : undefined}
      aria-checked={onPress ? !!selected : undefined}
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
