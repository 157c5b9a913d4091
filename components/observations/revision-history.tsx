import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useRevisions } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { Revision } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

const fieldLabels: Record<string, string> = {
  observedAt: 'time',
  kind: 'kind',
  title: 'title',
  note: 'note',
  depth: 'depth',
  lat: 'position',
  temperature: 'temperature',
  heading: 'heading',
  altitude: 'altitude',
  tags: 'tags',
  identificationDetail: 'identification',
  find: 'find',
  sample: 'sample',
};

/** Which fields a revision changed, compared with the one before it. */
export function changedFields(revision: Revision, previous: Revision | undefined): string[] {
  if (!previous) return [];
  return Object.keys(fieldLabels)
    .filter((k) => JSON.stringify(revision.snapshot[k]) !== JSON.stringify(previous.snapshot[k]))
    .map((k) => fieldLabels[k]!);
}

const actionLabels: Record<Revision['action'], string> = {
  created: 'Logged',
  updated: 'Changed',
  retired: 'Retired',
  restored: 'Restored',
};

/** Every earlier state of an entry: who changed what, and when. */
export function RevisionHistory({ id, version }: { id: string; version: number }) {
  const { colors } = useTheme();
  const [open, setOpen] = useState(false);
  const revisions = useRevisions(id, open);
  return (
    <View style={[styles.box, { borderColor: colors.border }]} testID="history">
      <Button
        label={open ? 'Hide history' : `History (${version} version${version === 1 ? '' : 's'})`}
        tone="ghost"
        compact
        onPress={() => setOpen((o) => !o)}
        testID="toggle-history"
      />
      {open && revisions.data
        ? revisions.data.map((r, i) => {
            const changed = changedFields(r, revisions.data[i + 1]);
            return (
              <View key={`${r.version}-${r.action}`} style={styles.item} testID={`revision-${r.version}`}>
                <Text variant="label">
                  v{r.version} · {actionLabels[r.action]} by {r.editedByName}
                </Text>
                <Text variant="monoSmall" muted>
                  {formatUtc(r.editedAt)}
                </Text>
                {changed.length > 0 ? <Text variant="caption">changed {changed.join(', ')}</Text> : null}
                {r.action === 'updated' && typeof r.snapshot.title === 'string' ? (
                  <Text variant="caption" muted numberOfLines={1}>
                    “{r.snapshot.title}”
                  </Text>
                ) : null}
              </View>
            );
          })
        : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderTopWidth: StyleSheet.hairlineWidth, paddingTop: space.sm, gap: space.sm, borderRadius: radius.sm },
  item: { gap: 2, paddingVertical: space.xs },
});
