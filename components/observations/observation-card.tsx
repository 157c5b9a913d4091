import { StyleSheet, View } from 'react-native';

import { Card } from '@/components/ui/card';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { isOtherDay, isOutsideDive } from '@/lib/dive-window';
import { formatDepth, formatScientificName, formatUtc, formatUtcTime } from '@/lib/format';
import type { Dive, Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { timecodeOf } from '@/components/telemetry/timecode-label';
import { KindBadge } from './kind-badge';
import { TagLabel } from './tag-label';

type Props = {
  observation: Observation;
  onPress: () => void;
  selected?: boolean;
  recording?: Dive['recording'];
  /** The dive's phases and plan: the date shows when the entry is not on the launch day, and an entry outside the window is marked. */
  timing?: Pick<Dive, 'phases' | 'plannedStartAt'>;
};

export function ObservationCard({ observation: o, onPress, selected, recording, timing }: Props) {
  const { colors } = useTheme();
  const tc = recording ? timecodeOf({ recording }, o.observedAt)?.label : null;
  const time = timing && isOtherDay(timing, o.observedAt) ? formatUtc(o.observedAt) : formatUtcTime(o.observedAt);
  const outside = !!timing && isOutsideDive(timing, o.observedAt);
  return (
    <Card testID={`observation-${o.id}`} onPress={onPress} selected={selected} accent={colors.kind[o.kind]} label={`${time} ${o.title}`}>
      <View style={styles.top}>
        <Text variant="mono" testID="observation-time">
          {time}
        </Text>
        <KindBadge kind={o.kind} />
        {outside ? (
          <Text variant="caption" color={colors.warning} testID="entry-outside-dive">
            outside the dive
          </Text>
        ) : null}
        <View style={styles.flex} />
        <Text variant="monoSmall" muted testID="observation-depth">
          {formatDepth(o.depth)}
        </Text>
      </View>
      {tc ? (
        <Text variant="monoSmall" muted testID="observation-timecode" accessibilityLabel={`Video time code ${tc}`}>
          TC {tc}
        </Text>
      ) : null}
      <Text variant="title" numberOfLines={2} testID="observation-title">
        {o.title}
      </Text>
      {o.identification || o.findNumber || o.photoCount > 0 ? (
        <View style={styles.meta}>
          {o.identification ? (
            <Text
              variant="caption"
              style={styles.italic}
              color={o.identification.verificationStatus === 'verified' ? colors.success : colors.text}
            >
              {formatScientificName(o.identification.scientificName, o.identification.qualifier)}
              {o.identification.verificationStatus === 'verified'
                ? ' ✓'
                : o.identification.verificationStatus === 'disputed'
                  ? ' (disputed)'
                  : ''}
            </Text>
          ) : null}
          {o.findNumber ? <Text variant="monoSmall">find {o.findNumber}</Text> : null}
          {o.photoCount > 0 ? (
            <Text variant="caption" muted>
              {o.photoCount} photo{o.photoCount === 1 ? '' : 's'}
            </Text>
          ) : null}
        </View>
      ) : null}
      <View style={styles.meta}>
        <Text variant="caption" muted>
          {o.authorName}
        </Text>
        {o.tags.map((t) => (
          <TagLabel key={t} name={t} />
        ))}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  top: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  flex: { flex: 1 },
  meta: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  italic: { fontStyle: 'italic' },
});
