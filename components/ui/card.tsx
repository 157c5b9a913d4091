import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View, type ViewStyle } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

type Props = {
  children: ReactNode;
  onPress?: () => void;
  selected?: boolean;
  testID?: string;
  style?: ViewStyle;
  accent?: string;
  label?: string;
};

export function Card({ children, onPress, selected, testID, style, accent, label }: Props) {
  const { colors } = useTheme();
  const body = [
    styles.card,
    { backgroundColor: colors.surface, borderColor: selected ? colors.accent : colors.border },
    accent ? { borderLeftColor: accent, borderLeftWidth: 4 } : null,
    style,
  ];
  if (!onPress) {
    return (
      <View testID={testID} style={body}>
        {children}
      </View>
    );
  }
  return (
    <Pressable
      testID={testID}
      onPress={onPress}
      accessibilityRole="link"
      accessibilityLabel={label}
      aria-current={selected ? 'true' : undefined}
      style={({ pressed }) => [body, pressed && { opacity: 0.85 }]}
    >
      {children}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  card: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
});
