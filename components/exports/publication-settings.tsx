import { useQueryClient } from '@tanstack/react-query';
import { StyleSheet, View } from 'react-native';

import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { exportKeys } from '@/hooks/exports';
import { useUpdateCampaign } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import type { Campaign, ExportLicence, PublicPositionMode } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

const licenceOptions: { value: ExportLicence; label: string }[] = [
  { value: 'CC0-1.0', label: 'CC0' },
  { value: 'CC-BY-4.0', label: 'CC BY 4.0' },
  { value: 'CC-BY-NC-4.0', label: 'CC BY-NC 4.0' },
];

const positionOptions: { value: PublicPositionMode; label: string }[] = [
  { value: 'exact', label: 'Exact' },
  { value: 'grid-0.01', label: '0.01° grid' },
  { value: 'grid-0.1', label: '0.1° grid' },
  { value: 'withheld', label: 'Withheld' },
];

/**
 * The licence of the published files and how positions appear in them. The lead changes them;
 * everyone else sees what applies.
 */
export function PublicationSettings({ campaign }: { campaign: Campaign }) {
  const { colors } = useTheme();
  const qc = useQueryClient();
  const update = useUpdateCampaign(campaign.id);
  const isLead = campaign.myRole === 'lead';
  const save = (patch: { exportLicence?: ExportLicence; publicPositions?: PublicPositionMode }) =>
    update.mutate(patch, { onSuccess: () => void qc.invalidateQueries({ queryKey: exportKeys.summary(campaign.id) }) });
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="publication-settings">
      <Text variant="title" role="heading" aria-level={2}>
        Publishing
      </Text>
      {isLead ? (
        <>
          <Segmented
            label="Licence of the published files"
            options={licenceOptions}
            value={campaign.exportLicence}
            onChange={(exportLicence) => save({ exportLicence })}
            testID="export-licence"
          />
          <Segmented
            label="Positions in public files (Darwin Core, GIS)"
            options={positionOptions}
            value={campaign.publicPositions}
            onChange={(publicPositions) => save({ publicPositions })}
            testID="export-positions"
          />
        </>
      ) : (
        <Text testID="publication-summary">
          {`Licence: ${licenceOptions.find((o) => o.value === campaign.exportLicence)?.label ?? campaign.exportLicence}. Positions in public files: ${
            positionOptions.find((o) => o.value === campaign.publicPositions)?.label.toLowerCase() ?? campaign.publicPositions
          }. The lead sets these.`}
        </Text>
      )}
      {update.error ? (
        <Text variant="caption" color={colors.danger} role="alert">
          {update.error instanceof ApiError ? update.error.message : 'Not saved.'}
        </Text>
      ) : null}
      <View style={[styles.caution, { backgroundColor: colors.surfaceAlt, borderColor: colors.warning }]} testID="heritage-caution">
        <Text variant="label">Protected sites</Text>
        <Text variant="caption">
          Underwater cultural heritage is protected by law in most waters (and by the UNESCO 2001 Convention where it applies). A published
          exact position can lead others to a wreck: round or withhold positions in public files unless the authority agrees, and follow
          local law. The find register always keeps exact positions, for the authority.
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.md, padding: space.lg, gap: space.md },
  caution: { borderLeftWidth: 4, borderRadius: radius.sm, padding: space.md, gap: space.xs },
});
