import { ActivityIndicator, Pressable, StyleSheet, View, type PressableProps } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Text } from './text';

type Props = Omit<PressableProps, 'children'> & {
  label: string;
  tone?: 'primary' | 'secondary' | 'danger' | 'ghost';
  busy?: boolean;
  icon?: string;
  compact?: boolean;
};

export function Button({ label, tone = 'primary', busy, disabled, icon, compact, style, ...rest }: Props) {
  const { colors } = useTheme();
  const bg = { primary: colors.accent, secondary: colors.surfaceAlt, danger: colors.danger, ghost: 'transparent' }[tone];
  const fg = { primary: colors.accentText, secondary: colors.text, danger: colors.bg, ghost: colors.accent }[tone];
  const inactive = disabled || busy;
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityState={{ disabled: !!inactive, busy: !!busy }}
      disabled={inactive}
      style={(state) => [
        styles.base,
        compact && styles.compact,
        { backgroundColor: bg, borderColor: tone === 'secondary' ? colors.border : bg, opacity: inactive ? 0.55 : state.pressed ? 0.8 : 1 },
        typeof style === 'function' ? style(state) : style,
      ]}
      {...rest}
    >
      <View style={styles.row}>
        {busy ? <ActivityIndicator size="small" color={fg} /> : icon ? <Text color={fg}>{icon}</Text> : null}
        <Text variant="label" color={fg}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: 44,
    paddingHorizontal: space.lg,
    borderRadius: radius.md,
    borderWidth: 1,
    alignItems: 'center',
    justifyContent: 'center',
  },
  compact: { minHeight: 34, paddingHorizontal: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
});
