import { StyleSheet, View } from 'react-native';

import { ErrorState, LoadingState } from '@/components/ui/states';
import { useCampaign } from '@/hooks/campaigns';
import { useExportSummary } from '@/hooks/exports';
import { space } from '@/lib/tokens';
import { ExportCard } from './export-card';
import { PublicationSettings } from './publication-settings';

/** The campaign's exports: the publishing settings, then a card per file with what it holds. */
export function ExportPanel({ campaignId }: { campaignId: string }) {
  const campaign = useCampaign(campaignId);
  const summary = useExportSummary(campaignId);
  if (campaign.isError || summary.isError) {
    return (
      <ErrorState
        error={campaign.error ?? summary.error}
        onRetry={() => {
          void campaign.refetch();
          void summary.refetch();
        }}
      />
    );
  }
  if (!campaign.data || !summary.data) return <LoadingState />;
  return (
    <View style={styles.wrap} testID="export-panel">
      <PublicationSettings campaign={campaign.data} />
      <View style={styles.cards}>
        {summary.data.cards.map((card) => (
          <ExportCard key={card.kind} card={card} campaignId={campaignId} positions={summary.data.publicPositions} />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  // Cards flow two abreast when the screen is wide enough for both, one above the other on a phone.
  cards: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
});
