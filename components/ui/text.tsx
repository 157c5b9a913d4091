import { Text as RNText, type TextProps } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { fonts, type as typeScale } from '@/lib/tokens';

type Variant = 'body' | 'caption' | 'label' | 'title' | 'heading' | 'mono' | 'monoSmall';

const variantStyle = {
  body: { ...typeScale.body, fontFamily: fonts.regular },
  caption: { ...typeScale.caption, fontFamily: fonts.regular },
  label: { ...typeScale.label, fontFamily: fonts.semibold },
  title: { ...typeScale.title, fontFamily: fonts.semibold },
  heading: { ...typeScale.heading, fontFamily: fonts.bold },
  mono: { ...typeScale.body, fontFamily: fonts.mono },
  monoSmall: { ...typeScale.caption, fontFamily: fonts.mono },
} as const;

export type AppTextProps = TextProps & { variant?: Variant; muted?: boolean; color?: string };

/** All visible words go through this, so type and colour follow the theme. */
export function Text({ variant = 'body', muted, color, style, ...rest }: AppTextProps) {
  const { colors } = useTheme();
  return <RNText {...rest} style={[variantStyle[variant], { color: color ?? (muted ? colors.textMuted : colors.text) }, style]} />;
}
