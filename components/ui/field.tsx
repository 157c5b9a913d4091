import { forwardRef } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { fonts, radius, space } from '@/lib/tokens';
import { Text } from './text';

type Props = TextInputProps & {
  label: string;
  error?: string;
  hint?: string;
  mono?: boolean;
  /** The label is still read out to screen readers, but not shown (a field in a tool bar). */
  hideLabel?: boolean;
};

/** A labelled text input that shows its field error beneath it. */
export const Field = forwardRef<TextInput, Props>(function Field({ label, error, hint, mono, hideLabel, style, testID, ...rest }, ref) {
  const { colors } = useTheme();
  return (
    <View style={styles.wrap}>
      {hideLabel ? null : (
        <Text variant="label" nativeID={testID ? `${testID}-label` : undefined}>
          {label}
        </Text>
      )}
      <TextInput
        ref={ref}
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={!!error}
        placeholderTextColor={colors.textMuted}
        style={[
          styles.input,
          {
            color: colors.text,
            backgroundColor: colors.surface,
            borderColor: error ? colors.danger : colors.border,
            fontFamily: mono ? fonts.mono : fonts.regular,
          },
          rest.multiline && styles.multiline,
          style,
        ]}
        {...rest}
      />
      {error ? (
        <Text variant="caption" color={colors.danger} testID={testID ? `${testID}-error` : undefined} role="alert">
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" muted testID={testID ? `${testID}-hint` : undefined}>
          {hint}
        </Text>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  input: { minHeight: 44, borderWidth: 1, borderRadius: radius.md, paddingHorizontal: space.md, paddingVertical: space.sm, fontSize: 16 },
  multiline: { minHeight: 120, textAlignVertical: 'top' },
});
