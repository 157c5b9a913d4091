import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { kindLabels } from '@/components/observations/kind-badge';
import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { useCampaignDives, useCampaigns } from '@/hooks/campaigns';
import type { SearchFilters } from '@/hooks/search';
import { parseUtcInput, toUtcInput } from '@/lib/format';
import { observationKinds } from '@/lib/schemas';
import { space } from '@/lib/tokens';

type Props = { filters: SearchFilters; onChange: (next: SearchFilters) => void; myId?: string };

/** Sets one filter (or clears it with undefined); choosing another campaign forgets the dive. */
function withFilter(filters: SearchFilters, name: keyof SearchFilters, value: string | undefined): SearchFilters {
  const next: SearchFilters = { ...filters };
  if (value === undefined || value === '') delete next[name];
  else (next as Record<string, string>)[name] = value;
  if (name === 'campaignId') delete next.diveId;
  return next;
}

/** A text filter that applies when the person leaves the field or presses Enter, not on every key. */
function FilterField({
  label,
  value,
  onCommit,
  testID,
  parse,
  placeholder,
}: {
  label: string;
  value: string | undefined;
  onCommit: (v: string | undefined) => void;
  testID: string;
  parse?: (text: string) => string | null;
  placeholder?: string;
}) {
  const [text, setText] = useState(value ?? '');
  const [error, setError] = useState<string | undefined>();
  const commit = () => {
    const trimmed = text.trim();
    if (!trimmed) {
      setError(undefined);
      return onCommit(undefined);
    }
    const parsed = parse ? parse(trimmed) : trimmed;
    if (parsed === null) return setError('Not understood');
    setError(undefined);
    onCommit(parsed);
  };
  return (
    <View style={styles.field}>
      <Field
        label={label}
        value={text}
        onChangeText={setText}
        onBlur={commit}
        onSubmitEditing={commit}
        testID={testID}
        placeholder={placeholder}
        error={error}
        autoCapitalize="none"
      />
    </View>
  );
}

const depthOf = (text: string) => (/^-?\d+(\.\d+)?$/.test(text) ? text : null);

export function SearchFilterChips({ filters, onChange, myId }: Props) {
  const campaigns = useCampaigns().data ?? [];
  const dives = useCampaignDives(filters.campaignId).data ?? [];
  const [more, setMore] = useState(() => !!(filters.tag || filters.minDepth || filters.maxDepth || filters.from || filters.to));
  const set = (name: keyof SearchFilters, value: string | undefined) => onChange(withFilter(filters, name, value));
  const toggle = (name: keyof SearchFilters, value: string) => set(name, filters[name] === value ? undefined : value);

  return (
    <View style={styles.wrap} testID="search-filters">
      {campaigns.length > 1 ? (
        <View style={styles.chips} role="group" aria-label="Campaign">
          {campaigns.map((c) => (
            <Chip
              key={c.id}
              label={c.name}
              selected={filters.campaignId === c.id}
              onPress={() => toggle('campaignId', c.id)}
              testID={`filter-campaign-${c.id}`}
            />
          ))}
        </View>
      ) : null}
      {filters.campaignId && dives.length > 0 ? (
        <View style={styles.chips} role="group" aria-label="Dive">
          {dives.map((d) => (
            <Chip
              key={d.id}
              label={d.number}
              selected={filters.diveId === d.id}
              onPress={() => toggle('diveId', d.id)}
              testID={`filter-dive-${d.number}`}
            />
          ))}
        </View>
      ) : null}
      <View style={styles.chips} role="group" aria-label="Kind and more">
        {observationKinds.map((k) => (
          <Chip key={k} label={kindLabels[k]} selected={filters.kind === k} onPress={() => toggle('kind', k)} testID={`filter-kind-${k}`} />
        ))}
        <Chip
          label="With photos"
          selected={filters.hasPhotos === 'true'}
          onPress={() => toggle('hasPhotos', 'true')}
          testID="filter-photos"
        />
        <Chip
          label="Verified names"
          selected={filters.verification === 'verified'}
          onPress={() => toggle('verification', 'verified')}
          testID="filter-verified"
        />
        {myId ? <Chip label="Mine" selected={filters.author === myId} onPress={() => toggle('author', myId)} testID="filter-mine" /> : null}
        <Button
          label={more ? 'Fewer filters' : 'More filters'}
          tone="secondary"
          compact
          onPress={() => setMore((m) => !m)}
          testID="filter-more"
        />
      </View>
      {more ? (
        <View style={styles.fields}>
          <FilterField label="Tag" value={filters.tag} onCommit={(v) => set('tag', v)} testID="filter-tag" />
          <FilterField
            label="From depth (m)"
            value={filters.minDepth}
            onCommit={(v) => set('minDepth', v)}
            parse={depthOf}
            testID="filter-min-depth"
          />
          <FilterField
            label="To depth (m)"
            value={filters.maxDepth}
            onCommit={(v) => set('maxDepth', v)}
            parse={depthOf}
            testID="filter-max-depth"
          />
          <FilterField
            label="From (UTC)"
            value={filters.from ? toUtcInput(filters.from) : undefined}
            onCommit={(v) => set('from', v)}
            parse={parseUtcInput}
            placeholder="2026-05-14 00:00"
            testID="filter-from"
          />
          <FilterField
            label="To (UTC)"
            value={filters.to ? toUtcInput(filters.to) : undefined}
            onCommit={(v) => set('to', v)}
            parse={parseUtcInput}
            placeholder="2026-05-15 00:00"
            testID="filter-to"
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  fields: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  field: { minWidth: 150, flexGrow: 1 },
});
