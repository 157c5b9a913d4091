import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { CampaignFields, campaignBody, draftOf, issuesToErrors, type CampaignDraftErrors } from '@/components/admin/campaign-fields';
import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useUpdateCampaign } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import type { Campaign } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

/** The lead's edit of the campaign's set-up: site, datum, dates, display zone, vessel and vehicle. */
export function CampaignSetup({ campaign }: { campaign: Campaign }) {
  const { colors } = useTheme();
  const [open, setOpen] = useState(false);
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="campaign-setup">
      <View style={styles.heading}>
        <Text variant="title" role="heading" aria-level={2} style={styles.flex}>
          Campaign set-up
        </Text>
        {open ? null : <Button label="Edit" tone="secondary" compact testID="campaign-setup-edit" onPress={() => setOpen(true)} />}
      </View>
      {open ? (
        <SetupEditor campaign={campaign} onDone={() => setOpen(false)} />
      ) : (
        <Text variant="caption" muted>
          Site, site datum, dates, display time zone, permit, vessel and vehicle.
        </Text>
      )}
    </View>
  );
}

function SetupEditor({ campaign, onDone }: { campaign: Campaign; onDone: () => void }) {
  const { colors } = useTheme();
  const toast = useToast();
  const update = useUpdateCampaign(campaign.id);
  const [draft, setDraft] = useState(() => draftOf(campaign));
  const [allowFreeTags, setAllowFreeTags] = useState(campaign.allowFreeTags);
  const [keepPhotoPositions, setKeepPhotoPositions] = useState(campaign.keepPhotoPositions);
  const [local, setLocal] = useState<CampaignDraftErrors>({});
  const server = update.error instanceof ApiError ? issuesToErrors(update.error.issues) : {};
  const errors = { ...server, ...local };
  const formError =
    update.error instanceof ApiError
      ? update.error.issues.length === 0
        ? update.error.message
        : server.form
      : update.error
        ? 'Not saved.'
        : null;

  const save = () => {
    const { body, errors: bad } = campaignBody(draft);
    setLocal(bad);
    if (Object.keys(bad).length > 0) return;
    update.mutate(
      { ...body, allowFreeTags, keepPhotoPositions },
      {
        onSuccess: () => {
          toast('Campaign set-up saved.');
          onDone();
        },
      },
    );
  };

  return (
    <View style={styles.form}>
      <CampaignFields draft={draft} onChange={setDraft} errors={errors} testID="campaign-setup" />
      <View style={styles.chips}>
        <Chip label="Anyone may add new tags" selected={allowFreeTags} onPress={() => setAllowFreeTags(!allowFreeTags)} />
        <Chip
          label="Keep GPS positions in photos"
          selected={keepPhotoPositions}
          onPress={() => setKeepPhotoPositions(!keepPhotoPositions)}
        />
      </View>
      <Text variant="caption" muted>
        Without free tags, entries take only the campaign’s vocabulary. Photo positions are dropped from uploaded files unless kept here.
      </Text>
      {formError ? (
        <Text color={colors.danger} role="alert" testID="campaign-setup-error">
          {formError}
        </Text>
      ) : null}
      <View style={styles.chips}>
        <Button label="Save set-up" testID="campaign-setup-save" busy={update.isPending} onPress={save} />
        <Button label="Cancel" tone="secondary" onPress={onDone} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1 },
  form: { gap: space.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
