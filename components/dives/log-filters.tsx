import { ScrollView, StyleSheet, View } from 'react-native';

import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useCampaignTags } from '@/hooks/campaigns';
import type { DiveLogFilters } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { observationKinds } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { kindLabels } from '../observations/kind-badge';

type Props = { campaignId: string; filters: DiveLogFilters; onChange: (f: DiveLogFilters) => void };

/** Narrow the log by kind, tag, photos and verification. */
export function LogFilters({ campaignId, filters, onChange }: Props) {
  const { colors } = useTheme();
  const tags = (useCampaignTags(campaignId).data ?? []).filter((t) => !t.retired && t.usage > 0).sort((a, b) => b.usage - a.usage);
  const set = (patch: Partial<DiveLogFilters>) => onChange({ ...filters, ...patch });
  return (
    <View style={styles.wrap} testID="log-filters">
      <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.row}>
        <Chip label="All kinds" selected={!filters.kind} onPress={() => set({ kind: undefined })} testID="filter-kind-all" />
        {observationKinds.map((k) => (
          <Chip
            key={k}
            label={kindLabels[k]}
            color={colors.kind[k]}
            selected={filters.kind === k}
            onPress={() => set({ kind: filters.kind === k ? undefined : k })}
            testID={`filter-kind-${k}`}
          />
        ))}
        <Chip
          label="With photos"
          selected={filters.hasPhotos === 'true'}
          onPress={() => set({ hasPhotos: filters.hasPhotos === 'true' ? undefined : 'true' })}
          testID="filter-photos"
        />
        {(['unverified', 'verified', 'disputed'] as const).map((v) => (
          <Chip
            key={v}
            label={`ID ${v}`}
            selected={filters.verification === v}
            onPress={() => set({ verification: filters.verification === v ? undefined : v })}
          />
        ))}
      </ScrollView>
      {tags.length > 0 ? (
        <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.row}>
          <Text variant="caption" muted>
            Tag
          </Text>
          {tags.slice(0, 24).map((t) => (
            <Chip
              key={t.id}
              label={`#${t.name}`}
              selected={filters.tag === t.name}
              onPress={() => set({ tag: filters.tag === t.name ? undefined : t.name })}
              testID={`filter-tag-${t.name}`}
            />
          ))}
        </ScrollView>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  row: { gap: space.sm, alignItems: 'center', paddingVertical: 2 },
});
