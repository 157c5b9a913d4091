import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Segmented } from '@/components/ui/segmented';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useCampaignTags } from '@/hooks/campaigns';
import { useSubscription, useUpdateSubscription } from '@/hooks/digests';
import { useTheme } from '@/hooks/theme';
import { observationKinds, type DigestFilters, type DigestFrequency, type ObservationKind, type Subscription } from '@/lib/schemas';
import { space } from '@/lib/tokens';

const frequencyOptions: { value: DigestFrequency; label: string }[] = [
  { value: 'after-each-dive', label: 'After each dive' },
  { value: 'daily', label: 'Daily' },
  { value: 'off', label: 'Off' },
];
const kindLabels: Record<ObservationKind, string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};

const toggle = <T,>(list: readonly T[] | undefined, item: T): T[] =>
  list?.includes(item) ? list.filter((x) => x !== item) : [...(list ?? []), item];

/**
 * My digest for one campaign: when it comes, and which entries it carries. Every filter left empty
 * matches everything; the digest holds only what is new or changed since the last one.
 */
export function SubscriptionForm({ campaignId }: { campaignId: string }) {
  const subscription = useSubscription(campaignId);
  if (subscription.isPending) return <LoadingState label="Loading your digest…" />;
  if (subscription.isError) return <ErrorState error={subscription.error} onRetry={() => void subscription.refetch()} />;
  return <SubscriptionEditor campaignId={campaignId} initial={subscription.data} />;
}

function SubscriptionEditor({ campaignId, initial }: { campaignId: string; initial: Subscription }) {
  const { colors } = useTheme();
  const toast = useToast();
  const tags = useCampaignTags(campaignId);
  const save = useUpdateSubscription(campaignId);
  const [frequency, setFrequency] = useState<DigestFrequency>(initial.frequency);
  const [filters, setFilters] = useState<DigestFilters>(initial.filters);
  const zone = initial.timeZone;
  const liveTags = (tags.data ?? []).filter((t) => !t.retired);
  return (
    <View style={styles.wrap} testID="subscription-form">
      <Text variant="title" role="heading" aria-level={2}>
        Your digest
      </Text>
      <Text muted>
        {frequency === 'daily'
          ? `A mail every morning at 07:00 ${zone} time with what was logged or changed since the last one.`
          : frequency === 'after-each-dive'
            ? 'A mail when a dive comes back on deck, with what was logged on it.'
            : 'No digest mails for this campaign.'}
      </Text>
      <Segmented label="When" options={frequencyOptions} value={frequency} onChange={setFrequency} testID="digest-frequency" />
      <Text variant="label">Kinds</Text>
      <View style={styles.row}>
        {observationKinds.map((k) => (
          <Chip
            key={k}
            label={kindLabels[k]}
            selected={!!filters.kinds?.includes(k)}
            testID={`digest-kind-${k}`}
            onPress={() => setFilters((f) => ({ ...f, kinds: toggle(f.kinds, k) }))}
          />
        ))}
      </View>
      <Text variant="caption" muted>
        {filters.kinds?.length ? 'Only these kinds.' : 'All kinds.'}
      </Text>
      <Text variant="label">Tags</Text>
      <View style={styles.row}>
        {liveTags.map((t) => (
          <Chip
            key={t.id}
            label={t.name}
            selected={!!filters.tags?.includes(t.name)}
            testID={`digest-tag-${t.name}`}
            onPress={() => setFilters((f) => ({ ...f, tags: toggle(f.tags, t.name) }))}
          />
        ))}
      </View>
      <Text variant="caption" muted>
        {filters.tags?.length ? `Only entries tagged ${filters.tags.join(' or ')}.` : 'Any tags, or none.'}
      </Text>
      <View style={styles.row}>
        <Chip
          label="Verified identifications only"
          selected={!!filters.verifiedOnly}
          testID="digest-verified"
          onPress={() => setFilters((f) => ({ ...f, verifiedOnly: !f.verifiedOnly }))}
        />
        <Chip
          label="With photos only"
          selected={!!filters.withPhotos}
          testID="digest-photos"
          onPress={() => setFilters((f) => ({ ...f, withPhotos: !f.withPhotos }))}
        />
      </View>
      <Button
        label="Save"
        testID="digest-save"
        busy={save.isPending}
        onPress={() => save.mutate({ frequency, filters }, { onSuccess: () => toast('Your digest is set.') })}
        style={styles.start}
      />
      {save.error ? (
        <Text color={colors.danger} role="alert" testID="digest-error">
          {save.error instanceof ApiError ? save.error.message : 'That did not go through. Try again.'}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  start: { alignSelf: 'flex-start' },
});
