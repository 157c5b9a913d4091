import { StyleSheet, View } from 'react-native';

import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useLayout } from '@/hooks/layout';
import { useMe } from '@/hooks/session';
import { useCampaignMembers } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { can } from '@/lib/permissions';
import { radius, space } from '@/lib/tokens';
import { CampaignSetup } from './campaign-setup';
import { InvitationList } from './invitation-list';
import { InviteForm } from './invite-form';
import { MemberList } from './member-list';

/**
 * The campaign's team. A lead invites, changes roles and removes; everyone else reads the list.
 * On a wide screen the members and the invitations sit side by side.
 */
export function TeamPanel({ campaignId }: { campaignId: string }) {
  const { colors } = useTheme();
  const { splitView } = useLayout();
  const campaign = useCampaign(campaignId);
  const members = useCampaignMembers(campaignId);
  const meId = useMe().data?.user.id;

  if (campaign.isPending || members.isPending) return <LoadingState label="Loading the team…" />;
  if (campaign.isError) return <ErrorState error={campaign.error} onRetry={() => void campaign.refetch()} />;
  if (members.isError) return <ErrorState error={members.error} onRetry={() => void members.refetch()} />;

  const isLead = can(campaign.data.myRole, 'team.manage');
  const sideBySide = isLead && splitView;
  const roster = (
    <View style={[styles.column, sideBySide && styles.half]}>
      <Text variant="title" role="heading" aria-level={2}>
        {`Members (${members.data.length})`}
      </Text>
      {isLead ? null : (
        <View style={[styles.note, { borderColor: colors.border, backgroundColor: colors.surfaceAlt }]}>
          <Text testID="team-readonly-note">
            {campaign.data.myRole === 'admin'
              ? 'Only a lead of this campaign manages its team. As site administrator you see it, but invitations, roles and removals are the leads’ to make.'
              : 'Only a campaign lead manages the team: invitations, roles and removals. Ask a lead if someone should join or change role.'}
          </Text>
        </View>
      )}
      <MemberList campaignId={campaignId} campaignName={campaign.data.name} members={members.data} meId={meId} manage={isLead} />
    </View>
  );
  if (!isLead) return roster;

  const tools = (
    <View style={[styles.column, sideBySide && styles.half]}>
      <InviteForm campaignId={campaignId} />
      <InvitationList campaignId={campaignId} />
      <CampaignSetup campaign={campaign.data} />
    </View>
  );
  return (
    <View style={sideBySide ? styles.split : styles.stack} testID="team-panel">
      {roster}
      {tools}
    </View>
  );
}

const styles = StyleSheet.create({
  split: { flexDirection: 'row', gap: space.xl, alignItems: 'flex-start' },
  stack: { gap: space.xl },
  column: { gap: space.md },
  half: { flex: 1, minWidth: 0 },
  note: { borderWidth: 1, borderRadius: radius.md, padding: space.md },
});
