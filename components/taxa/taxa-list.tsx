import { Link } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { PhotoImage } from '@/components/photos/photo-image';
import { Segmented } from '@/components/ui/segmented';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { apiUrl } from '@/hooks/api';
import { useTaxa, type TaxaSort } from '@/hooks/taxa';
import { useTheme } from '@/hooks/theme';
import { formatDepth, formatUtc } from '@/lib/format';
import type { TaxonSeen } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

const sorts: { value: TaxaSort; label: string }[] = [
  { value: 'name', label: 'Name' },
  { value: 'entries', label: 'Entries' },
  { value: 'count', label: 'Count' },
  { value: 'first', label: 'First seen' },
  { value: 'last', label: 'Last seen' },
  { value: 'depth', label: 'Deepest' },
];

const percent = (share: number) => `${Math.round(share * 100)} %`;
const depthRange = (t: TaxonSeen) =>
  t.depthMin === null || t.depthMax === null
    ? 'no depth'
    : t.depthMin === t.depthMax
      ? formatDepth(t.depthMin)
      : `${formatDepth(t.depthMin)} – ${formatDepth(t.depthMax)}`;

/**
 * Every taxon identified on a dive or across a campaign: how often, how many, when first and last
 * seen, at what depths and how much of it is verified, with a photo where there is one. Each row
 * opens to the entries behind it.
 */
export function TaxaList({ scope }: { scope: { campaignId: string } | { diveId: string } }) {
  const [sort, setSort] = useState<TaxaSort>('name');
  const taxa = useTaxa(scope, sort);
  const { breakpoint } = useLayout();
  const wide = breakpoint !== 'phone';
  const items = taxa.data?.items ?? [];
  return (
    <View style={styles.wrap} testID="taxa">
      <Segmented label="Sort by" options={sorts} value={sort} onChange={setSort} testID="taxa-sort" />
      {taxa.isPending ? (
        <LoadingState label="Gathering the taxa…" />
      ) : taxa.isError ? (
        <ErrorState error={taxa.error} onRetry={() => void taxa.refetch()} />
      ) : items.length === 0 ? (
        <EmptyState
          title="No taxa identified yet"
          body="A taxon appears here once a biology entry carries an identification. Add one from the entry's page."
        />
      ) : (
        <>
          <Text variant="caption" muted testID="taxa-total">
            {items.length === 1 ? '1 taxon' : `${items.length} taxa`} · {items.reduce((n, t) => n + t.entries, 0)} entries
          </Text>
          {items.map((t) => (
            <TaxonRow key={t.scientificName} taxon={t} wide={wide} />
          ))}
        </>
      )}
    </View>
  );
}

function TaxonRow({ taxon: t, wide }: { taxon: TaxonSeen; wide: boolean }) {
  const { colors } = useTheme();
  const [open, setOpen] = useState(false);
  const facts = [
    `${t.entries} ${t.entries === 1 ? 'entry' : 'entries'}`,
    t.totalCount === null ? 'not counted' : `${t.totalCount} counted`,
    depthRange(t),
    `${percent(t.verifiedShare)} verified`,
  ];
  return (
    <View style={[styles.row, { borderColor: colors.border, backgroundColor: colors.surface }]} testID={`taxon-${t.scientificName}`}>
      <Pressable
        onPress={() => setOpen((o) => !o)}
        role="button"
        aria-expanded={open}
        aria-label={`${t.scientificName}: ${facts.join(', ')}`}
        style={[styles.head, wide && styles.headWide]}
      >
        {t.photoId ? (
          <View style={styles.thumb}>
            <PhotoImage uri={apiUrl(`/api/photos/${encodeURIComponent(t.photoId)}?size=thumb`)} label={`Photo of ${t.scientificName}`} />
          </View>
        ) : (
          <View style={[styles.thumb, { backgroundColor: colors.surfaceAlt }]} />
        )}
        <View style={styles.names}>
          <Text variant="label" style={styles.italic} testID="taxon-name">
            {t.scientificName}
          </Text>
          <Text variant="caption" muted>
            {[t.taxonRank, t.onChecklist === false ? 'not on the species list' : null].filter(Boolean).join(' · ') || ' '}
          </Text>
        </View>
        <View style={[styles.facts, wide && styles.factsWide]}>
          {facts.map((f) => (
            <Text key={f} variant="monoSmall" style={wide ? styles.fact : undefined}>
              {f}
            </Text>
          ))}
          <Text variant="caption" muted>
            {formatUtc(t.firstSeen)} → {formatUtc(t.lastSeen)}
          </Text>
        </View>
      </Pressable>
      {open ? (
        <View style={styles.sightings} testID="taxon-entries">
          {t.sightings.map((s) => (
            <Link key={s.id} href={`/observations/${s.id}`} style={{ color: colors.accent }}>
              <Text color={colors.accent}>
                {formatUtc(s.observedAt)} · {s.title}
                {s.depth === null ? '' : ` · ${formatDepth(s.depth)}`}
              </Text>
            </Link>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  row: { borderWidth: 1, borderRadius: radius.lg, padding: space.md, gap: space.sm },
  head: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center' },
  headWide: { flexWrap: 'nowrap' },
  thumb: { width: 56, height: 56, borderRadius: radius.md, overflow: 'hidden' },
  names: { flexGrow: 1, flexShrink: 1, minWidth: 160, gap: 2 },
  italic: { fontStyle: 'italic' },
  facts: { flexBasis: '100%', gap: 2 },
  factsWide: { flexBasis: 'auto', flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.md, maxWidth: 640 },
  fact: { minWidth: 110 },
  sightings: { gap: space.xs, paddingLeft: space.md },
});
