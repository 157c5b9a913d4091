import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useInvite } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import type { CampaignRole } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { roleDescriptions, roleLabels, roleOrder } from '@/lib/permissions';

/** The lead's form for inviting someone by e-mail with the role they will have. */
export function InviteForm({ campaignId }: { campaignId: string }) {
  const { colors } = useTheme();
  const toast = useToast();
  const invite = useInvite(campaignId);
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<CampaignRole>('guest');
  const [name, setName] = useState('');

  const err = invite.error;
  const issue = (path: string) => (err instanceof ApiError ? err.issues.find((i) => i.path === path)?.message : undefined);
  const formError =
    err instanceof ApiError
      ? err.issues.length === 0 || err.issues.some((i) => i.path === '(body)')
        ? err.message
        : null
      : err
        ? 'The invitation could not be sent. Try again.'
        : null;

  const submit = () => {
    if (invite.isPending) return;
    const address = email.trim();
    invite.mutate(
      { email: address, role, ...(name.trim() ? { name: name.trim() } : {}) },
      {
        onSuccess: (inv) => {
          toast(`Invitation sent to ${inv.email}.`);
          setEmail('');
          setName('');
        },
      },
    );
  };

  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="invite-form">
      <Text variant="title" role="heading" aria-level={2}>
        Invite someone
      </Text>
      <Text variant="caption" muted>
        They get a mail with a sign-in link that works once, for 72 hours. Nobody joins a campaign without one.
      </Text>
      <Field
        label="E-mail"
        testID="invite-email"
        value={email}
        onChangeText={(v) => {
          setEmail(v);
          if (invite.isError) invite.reset();
        }}
        autoCapitalize="none"
        autoComplete="email"
        keyboardType="email-address"
        inputMode="email"
        placeholder="name@example.org"
        error={issue('email')}
      />
      <Segmented<CampaignRole>
        label="Role"
        testID="invite-role"
        value={role}
        onChange={setRole}
        error={issue('role')}
        options={roleOrder.map((r) => ({ value: r, label: roleLabels[r] }))}
      />
      <Text variant="caption" muted testID="invite-role-help">
        {roleDescriptions[role]}
      </Text>
      <Field
        label="Name (optional)"
        testID="invite-name"
        value={name}
        onChangeText={setName}
        autoComplete="name"
        hint="Greets them in the mail and names their account"
        error={issue('name')}
        returnKeyType="send"
        onSubmitEditing={submit}
      />
      {formError ? (
        <View style={[styles.problem, { backgroundColor: colors.dangerBg }]}>
          <Text color={colors.danger} role="alert" testID="invite-error">
            {formError}
          </Text>
        </View>
      ) : null}
      <Button label="Send invitation" testID="invite-submit" busy={invite.isPending} disabled={!email.trim()} onPress={submit} />
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  problem: { borderRadius: radius.md, padding: space.md },
});
