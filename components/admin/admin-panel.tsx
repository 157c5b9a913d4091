import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { CampaignAdminList } from './campaign-admin-list';
import { NewCampaignForm } from './new-campaign-form';
import { UserList } from './user-list';

/** Says plainly why the page is empty for anyone but the site administrator. */
export function AdminOnly() {
  const { colors } = useTheme();
  return (
    <View style={[styles.note, { borderColor: colors.border, backgroundColor: colors.surfaceAlt }]} testID="admin-only">
      <Text>Only the site administrator sees this page: it creates campaigns and their first leads, and manages accounts.</Text>
    </View>
  );
}

/** The site administrator's page: campaigns and their leads, a new campaign, and every account. */
export function AdminPanel() {
  const me = useMe().data;
  const { splitView } = useLayout();
  const [creating, setCreating] = useState(false);
  if (me?.siteRole !== 'admin') return <AdminOnly />;
  const campaigns = (
    <View style={[styles.column, splitView && styles.half]}>
      <View style={styles.heading}>
        <Text variant="title" role="heading" aria-level={2} style={styles.flex}>
          Campaigns
        </Text>
        {creating ? null : <Button label="New campaign" compact testID="new-campaign" onPress={() => setCreating(true)} />}
      </View>
      {creating ? <NewCampaignForm onDone={() => setCreating(false)} /> : null}
      <CampaignAdminList />
    </View>
  );
  const accounts = (
    <View style={[styles.column, splitView && styles.half]}>
      <Text variant="title" role="heading" aria-level={2}>
        Accounts
      </Text>
      <UserList />
    </View>
  );
  return (
    <View style={splitView ? styles.split : styles.stack}>
      {campaigns}
      {accounts}
    </View>
  );
}

const styles = StyleSheet.create({
  split: { flexDirection: 'row', gap: space.xl, alignItems: 'flex-start' },
  stack: { gap: space.xl },
  column: { gap: space.md },
  half: { flex: 1, minWidth: 0 },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1 },
  note: { borderWidth: 1, borderRadius: radius.md, padding: space.md },
});
