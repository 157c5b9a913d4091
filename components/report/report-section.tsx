import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';
import { PAGE_BREAK } from './paper';

/** One section of the report under its title; in print, `newPage` starts it on a page of its own. */
export function ReportSection({
  id,
  title,
  newPage = true,
  children,
}: {
  id: string;
  title: string;
  newPage?: boolean;
  children: ReactNode;
}) {
  const { colors } = useTheme();
  return (
    <>
      {newPage ? <View testID={PAGE_BREAK} /> : null}
      <View style={[styles.section, { borderTopColor: colors.border }]} testID={`report-section-${id}`}>
        <Text variant="title" role="heading" aria-level={2}>
          {title}
        </Text>
        {children}
      </View>
    </>
  );
}

/** A line of label and value, as in the header and the tables. */
export function Fact({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.fact} testID={testID}>
      <Text variant="label" style={styles.factLabel}>
        {label}
      </Text>
      <Text style={styles.factValue}>{value}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  section: { gap: space.md, paddingTop: space.lg, borderTopWidth: 1 },
  fact: { flexDirection: 'row', gap: space.sm },
  factLabel: { minWidth: 110 },
  factValue: { flex: 1 },
});
