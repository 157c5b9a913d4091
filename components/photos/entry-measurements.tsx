import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useEntryMeasurements, useRetireMeasurement } from '@/hooks/measurements';
import { formatUtc } from '@/lib/format';
import { formatMeasurement } from '@/lib/laser-scale';
import type { ObservationDetail } from '@/lib/schemas';
import { space } from '@/lib/tokens';

const kindLabel = { length: 'Length', area: 'Area' } as const;

/** The laser-scale measurements made on an entry's photos, with who made them and when. */
export function EntryMeasurements({
  observation,
  myId,
  isLead,
  canEdit,
}: {
  observation: Pick<ObservationDetail, 'id' | 'diveId' | 'photos'>;
  myId: string | undefined;
  isLead: boolean;
  canEdit: boolean;
}) {
  const list = useEntryMeasurements(observation.id).data?.items ?? [];
  const retire = useRetireMeasurement(observation);
  if (list.length === 0) return null;
  const photoNumber = new Map(observation.photos.map((p, i) => [p.id, i + 1]));

  return (
    <View style={styles.wrap} testID="entry-measurements">
      <Text variant="label">Measurements from photos</Text>
      {list.map((m) => (
        <View key={m.id} style={styles.row} testID={`entry-measurement-${m.id}`}>
          <View style={styles.text}>
            <Text testID="entry-measurement-value">
              {kindLabel[m.kind]} {formatMeasurement(m)}
            </Text>
            <Text variant="caption" muted style={styles.text}>
              {[`photo ${photoNumber.get(m.photoId) ?? '?'}`, `laser ${m.spacingCm} cm`, m.createdByName, formatUtc(m.createdAt)].join(
                ' · ',
              )}
            </Text>
          </View>
          {canEdit && (isLead || m.createdBy === myId) ? (
            <Button
              label="Remove"
              tone="ghost"
              compact
              busy={retire.isPending && retire.variables === m.id}
              onPress={() => retire.mutate(m.id)}
              testID="entry-measurement-remove"
            />
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  text: { flexShrink: 1, flexGrow: 1 },
});
