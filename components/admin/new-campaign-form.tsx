import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useCreateCampaign } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { CampaignFields, campaignBody, emptyCampaignDraft, issuesToErrors, type CampaignDraftErrors } from './campaign-fields';

/** A new campaign and its first lead: an existing account becomes lead at once, anyone else is invited. */
export function NewCampaignForm({ onDone }: { onDone: () => void }) {
  const { colors } = useTheme();
  const toast = useToast();
  const create = useCreateCampaign();
  const [draft, setDraft] = useState(emptyCampaignDraft);
  const [leadEmail, setLeadEmail] = useState('');
  const [leadName, setLeadName] = useState('');
  const [local, setLocal] = useState<CampaignDraftErrors>({});
  const server: Record<string, string | undefined> = create.error instanceof ApiError ? issuesToErrors(create.error.issues) : {};
  const errors: Record<string, string | undefined> = { ...server, ...local };
  const formError =
    create.error instanceof ApiError
      ? create.error.issues.length === 0
        ? create.error.message
        : server.form
      : create.error
        ? 'The campaign was not created. Try again.'
        : null;

  const submit = () => {
    if (create.isPending) return;
    const { body, errors: bad } = campaignBody(draft);
    setLocal(bad);
    if (Object.keys(bad).length > 0) return;
    create.mutate(
      { ...body, leadEmail: leadEmail.trim(), ...(leadName.trim() ? { leadName: leadName.trim() } : {}) },
      {
        onSuccess: (c) => {
          toast(
            c.leadInvited
              ? `${c.name} created; the invitation to lead it is on its way to ${leadEmail.trim()} (the mail log shows when it has gone).`
              : `${c.name} created; ${leadEmail.trim()} leads it from now on.`,
          );
          onDone();
        },
      },
    );
  };

  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="new-campaign-form">
      <Text variant="title" role="heading" aria-level={2}>
        New campaign
      </Text>
      <CampaignFields draft={draft} onChange={setDraft} errors={errors} testID="new-campaign" />
      <Text variant="label">First lead</Text>
      <Text variant="caption" muted>
        Someone with an account here becomes lead at once; anyone else gets an invitation by mail.
      </Text>
      <Field
        label="Lead’s e-mail"
        testID="new-campaign-leadEmail"
        value={leadEmail}
        onChangeText={setLeadEmail}
        autoCapitalize="none"
        keyboardType="email-address"
        inputMode="email"
        error={errors.leadEmail}
      />
      <Field
        label="Lead’s name (optional)"
        testID="new-campaign-leadName"
        value={leadName}
        onChangeText={setLeadName}
        error={errors.leadName}
      />
      {formError ? (
        <Text color={colors.danger} role="alert" testID="new-campaign-error">
          {formError}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Create campaign" testID="new-campaign-submit" busy={create.isPending} onPress={submit} />
        <Button label="Cancel" tone="secondary" onPress={onDone} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
