import { StyleSheet } from 'react-native';

import { Text, type AppTextProps } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import type { TextSegment } from '@/lib/schemas/search';
import { fonts } from '@/lib/tokens';

/** Text with the stretches a search matched emphasised: plain text nodes only, never HTML. */
export function HighlightedText({ parts, ...rest }: AppTextProps & { parts: TextSegment[] }) {
  const { colors } = useTheme();
  // A stretch is known by where it starts in the text.
  const placed = parts.reduce<(TextSegment & { start: number })[]>((acc, p) => {
    const last = acc[acc.length - 1];
    return [...acc, { ...p, start: last ? last.start + last.text.length : 0 }];
  }, []);
  return (
    <Text {...rest}>
      {placed.map((p) =>
        p.match ? (
          <Text key={p.start} testID="search-match" style={[styles.match, { backgroundColor: colors.surfaceAlt, color: colors.text }]}>
            {p.text}
          </Text>
        ) : (
          p.text
        ),
      )}
    </Text>
  );
}

const styles = StyleSheet.create({
  match: { fontFamily: fonts.bold, borderRadius: 3 },
});
