import { StyleSheet, View } from 'react-native';

import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useObservation } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatDepth, formatInZone, formatLatLon, formatTemperature, formatUtc } from '@/lib/format';
import type { Observation, ObservationDetail as Detail } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { KindBadge } from './kind-badge';
import { ObservationPhotos } from '@/components/photos/observation-photos';
import { NoteView } from './note-view';

const sourceLabel = (s: Observation['depthSource']) => (s === 'telemetry' ? 'from telemetry' : s === 'manual' ? 'typed in' : 'no value');

export function ObservationDetail({ id }: { id: string }) {
  const observation = useObservation(id);
  if (observation.isPending) return <LoadingState label="Loading the entry…" />;
  if (observation.isError) return <ErrorState error={observation.error} onRetry={() => void observation.refetch()} />;
  return <ObservationBody observation={observation.data} />;
}

function ObservationBody({ observation: o }: { observation: Detail }) {
  const { colors } = useTheme();
  const campaign = useCampaign(o.campaignId).data;
  const facts: [string, string, string?][] = [
    ['Time (UTC)', formatUtc(o.observedAt, true)],
    ...(campaign && campaign.timeZone !== 'UTC'
      ? ([[`Local (${campaign.timeZone})`, formatInZone(o.observedAt, campaign.timeZone)]] as [string, string][])
      : []),
    ['Depth', formatDepth(o.depth), sourceLabel(o.depthSource)],
    ['Position', formatLatLon(o.lat, o.lon), sourceLabel(o.positionSource)],
    ['Water temperature', formatTemperature(o.temperature), sourceLabel(o.temperatureSource)],
  ];
  return (
    <View style={styles.wrap} testID="observation-detail">
      <View style={styles.head}>
        <KindBadge kind={o.kind} />
        <Text variant="heading" testID="detail-title">
          {o.title}
        </Text>
        <Text variant="caption" muted>
          Logged by {o.authorName} · version {o.version}
        </Text>
      </View>
      <View style={[styles.facts, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        {facts.map(([label, value, source]) => (
          <View key={label} style={styles.fact}>
            <Text variant="caption" muted>
              {label}
            </Text>
            <Text variant="mono" testID={`fact-${label.split(' ')[0]!.toLowerCase()}`}>
              {value}
            </Text>
            {source && value !== '—' ? (
              <Text variant="caption" muted>
                {source}
              </Text>
            ) : null}
          </View>
        ))}
      </View>
      {o.tags.length > 0 ? (
        <View style={styles.tags}>
          {o.tags.map((t) => (
            <Text key={t} variant="label" color={colors.accent}>
              #{t}
            </Text>
          ))}
        </View>
      ) : null}
      <View style={[styles.note, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        {o.note.trim() ? <NoteView markdown={o.note} testID="detail-note" /> : <Text muted>No note yet.</Text>}
      </View>
      <ObservationPhotos observation={o} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  head: { gap: space.sm, alignItems: 'flex-start' },
  facts: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  fact: { minWidth: 160, gap: 2 },
  tags: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  note: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg },
});
