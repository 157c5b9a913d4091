import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useMe, useSignOut } from '@/hooks/session';
import { useTheme, type ThemePreference } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

export function AccountPanel() {
  const me = useMe().data;
  const signOut = useSignOut();
  const { preference, setPreference, colors } = useTheme();
  return (
    <View style={styles.wrap}>
      {me ? (
        <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]}>
          <Text variant="title">{me.user.name}</Text>
          <Text muted testID="account-email">
            {me.user.email}
          </Text>
          {me.siteRole === 'admin' ? <Text variant="caption">Site administrator</Text> : null}
        </View>
      ) : null}
      <Segmented<ThemePreference>
        label="Theme"
        testID="theme"
        value={preference}
        onChange={setPreference}
        options={[
          { value: 'system', label: 'Follow the device' },
          { value: 'dark', label: 'Dark (control room)' },
          { value: 'light', label: 'Light' },
        ]}
      />
      <Button label="Sign out" tone="secondary" testID="sign-out" busy={signOut.isPending} onPress={() => signOut.mutate()} />
      <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        <Text variant="label">Cautions</Text>
        <Text variant="caption" muted>
          Bathynote records; it does not authorise. Underwater cultural heritage is protected by law in most waters (and by the UNESCO 2001
          Convention where it applies): recovering an object needs a permit, and a recovered artefact needs immediate conservation care —
          kept wet — by a conservator. Biological sampling can need permits, including access and benefit-sharing rules. Follow local law
          and licensed practice.
        </Text>
        <Text variant="caption" muted>
          Bathynote is not a navigation or vehicle-control system: never steer the vehicle or judge a dive’s safety from it.
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
});
