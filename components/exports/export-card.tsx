import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Text } from '@/components/ui/text';
import { exportPaths } from '@/hooks/exports';
import { useTheme } from '@/hooks/theme';
import type { ExportCard as Card_, ExportKind, PublicPositionMode } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { saveFile } from './save-file';

const about: Record<ExportKind, { title: string; what: string; unit: string; file: string }> = {
  'darwin-core': {
    title: 'Darwin Core Archive',
    what: 'The biology entries as Darwin Core occurrences, with the dataset’s description, for a biodiversity data portal.',
    unit: 'occurrences',
    file: 'ZIP: meta.xml, eml.xml, occurrence.txt',
  },
  finds: {
    title: 'Find register',
    what: 'Every find in find-number order with its custody, for the permit report to the heritage authority.',
    unit: 'finds',
    file: 'CSV (UTF-8)',
  },
  geojson: {
    title: 'Positions for GIS',
    what: 'Every entry with a position, as points with their depth, dive and time, to open in a GIS.',
    unit: 'points',
    file: 'GeoJSON (WGS 84)',
  },
  csv: {
    title: 'All entries as CSV',
    what: 'Every entry of the campaign, for a spreadsheet. For a filtered list, use “Download this list as CSV” on a dive log’s filters.',
    unit: 'entries',
    file: 'CSV (UTF-8)',
  },
};

const positionWords: Record<PublicPositionMode, string> = {
  exact: 'Positions exact, as recorded.',
  'grid-0.01': 'Positions rounded to a 0.01° grid (about 1 km).',
  'grid-0.1': 'Positions rounded to a 0.1° grid (about 10 km).',
  withheld: 'Positions withheld.',
};

/** "1.2 MB": decimal units, as file managers show them. */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return `${bytes} B`;
  const units = ['kB', 'MB', 'GB'];
  let value = bytes / 1000;
  let unit = 0;
  while (value >= 1000 && unit < units.length - 1) {
    value /= 1000;
    unit++;
  }
  return `${value < 10 ? value.toFixed(1) : Math.round(value)} ${units[unit]}`;
}

const day = (iso: string) => iso.slice(0, 10);

export function ExportCard({ card, campaignId, positions }: { card: Card_; campaignId: string; positions: PublicPositionMode }) {
  const { colors } = useTheme();
  const text = about[card.kind];
  const span =
    card.firstAt && card.lastAt
      ? day(card.firstAt) === day(card.lastAt)
        ? day(card.firstAt)
        : `${day(card.firstAt)} to ${day(card.lastAt)}`
      : null;
  const facts = [
    `${card.rows.toLocaleString('en')} ${text.unit}`,
    `${card.dives} ${card.dives === 1 ? 'dive' : 'dives'}`,
    ...(span ? [`${span} (UTC)`] : []),
    `about ${formatBytes(card.estimatedBytes)}`,
  ].join(' · ');
  // A GIS file whose positions are all withheld is still a valid, empty file; a campaign with no entries has nothing to give.
  const empty = card.rows === 0 && card.withoutPosition === 0;
  const positionNote = card.public
    ? positionWords[positions]
    : card.kind === 'finds'
      ? 'Exact positions, always: this file is for the heritage authority, not for publication.'
      : 'Exact positions: for the team only.';
  return (
    <Card testID={`export-card-${card.kind}`} style={styles.card}>
      <Text variant="title" role="heading" aria-level={2}>
        {text.title}
      </Text>
      <Text variant="caption" muted>
        {text.file}
      </Text>
      <Text>{text.what}</Text>
      <Text variant="label" testID={`export-facts-${card.kind}`}>
        {facts}
      </Text>
      <Text
        variant="caption"
        color={card.public && positions === 'exact' ? colors.warning : undefined}
        muted={!(card.public && positions === 'exact')}
      >
        {positionNote}
        {card.withoutPosition > 0 ? ` ${card.withoutPosition.toLocaleString('en')} without a position shown.` : ''}
      </Text>
      <View style={styles.actions}>
        <Button
          label="Download"
          compact
          disabled={empty}
          testID={`export-download-${card.kind}`}
          onPress={() => saveFile(exportPaths[card.kind](campaignId))}
        />
        {empty ? (
          <Text variant="caption" muted>
            Nothing to export yet.
          </Text>
        ) : null}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  card: { gap: space.sm, flexGrow: 1, flexBasis: 320 },
  actions: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
