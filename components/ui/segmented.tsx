import { Pressable, StyleSheet, View } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Text } from './text';

type Option<T extends string> = { value: T; label: string; color?: string };

type Props<T extends string> = {
  label: string;
  options: Option<T>[];
  value: T | undefined;
  onChange: (v: T) => void;
  testID?: string;
  error?: string;
  /** The label is still read out to screen readers, but not shown. */
  hideLabel?: boolean;
};

/** A row of mutually exclusive choices, each big enough for a thumb. */
export function Segmented<T extends string>({ label, options, value, onChange, testID, error, hideLabel }: Props<T>) {
  const { colors } = useTheme();
  return (
    <View style={styles.wrap}>
      {hideLabel ? null : <Text variant="label">{label}</Text>}
      <View style={styles.row} role="radiogroup" aria-label={label} testID={testID}>
        {options.map((o) => {
          const selected = o.value === value;
          const tint = o.color ?? colors.accent;
          return (
            <Pressable
              key={o.value}
              testID={testID ? `${testID}-${o.value}` : undefined}
              role="radio"
              aria-checked={selected}
              onPress={() => onChange(o.value)}
              style={[styles.option, { borderColor: selected ? tint : colors.border, backgroundColor: selected ? tint : colors.surface }]}
            >
              <Text variant="label" color={selected ? colors.bg : colors.text}>
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="caption" color={colors.danger} role="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  option: { minHeight: 44, paddingHorizontal: space.md, borderRadius: radius.md, borderWidth: 1, justifyContent: 'center' },
});
