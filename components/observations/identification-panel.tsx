import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useSetIdentification, useVerifyIdentification } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatScientificName, formatUtc } from '@/lib/format';
import { identificationConfidences, identificationQualifiers, taxonRanks, type ObservationDetail } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

type Props = { observation: ObservationDetail; myRole: string | undefined; myId: string | undefined };

const statusLabel = { unverified: 'Not verified yet', verified: 'Verified', disputed: 'Disputed' } as const;

/** A biology entry's identification: the proposed name, and its verification by someone else. */
export function IdentificationPanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const ident = o.identificationDetail;
  const [editing, setEditing] = useState(false);
  const verify = useVerifyIdentification(o.id);
  const mayPropose = myRole === 'lead' || myRole === 'scientist' || o.authorId === myId;
  const mayVerify = !!ident && (myRole === 'lead' || (myRole === 'scientist' && ident.identifiedBy !== myId && o.authorId !== myId));
  const tint = ident
    ? { unverified: colors.warning, verified: colors.success, disputed: colors.danger }[ident.verificationStatus]
    : colors.textMuted;

  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="identification">
      <Text variant="label">Identification</Text>
      {ident && !editing ? (
        <>
          <Text variant="title" style={styles.name} testID="scientific-name">
            {formatScientificName(ident.scientificName, ident.qualifier)}
          </Text>
          <Text variant="caption" muted>
            {[ident.taxonRank, ident.confidence ? `${ident.confidence} confidence` : null, `proposed by ${ident.identifiedByName}`]
              .filter(Boolean)
              .join(' · ')}
          </Text>
          {ident.taxonId ? (
            <Text variant="monoSmall" muted selectable>
              {ident.taxonId}
            </Text>
          ) : null}
          <Text variant="label" color={tint} testID="verification-status">
            {statusLabel[ident.verificationStatus]}
            {ident.verifiedByName && ident.verifiedAt ? ` by ${ident.verifiedByName}, ${formatUtc(ident.verifiedAt)}` : ''}
          </Text>
          {ident.verificationNote ? <Text muted>{ident.verificationNote}</Text> : null}
          <View style={styles.row}>
            {mayVerify ? (
              <>
                <Button
                  label="Verify"
                  compact
                  busy={verify.isPending}
                  onPress={() => verify.mutate({ status: 'verified' })}
                  testID="verify"
                />
                <Button label="Dispute" tone="secondary" compact onPress={() => verify.mutate({ status: 'disputed' })} testID="dispute" />
              </>
            ) : null}
            {mayPropose ? (
              <Button label="Change name" tone="ghost" compact onPress={() => setEditing(true)} testID="edit-identification" />
            ) : null}
          </View>
          {verify.error instanceof ApiError ? <Text color={colors.danger}>{verify.error.message}</Text> : null}
        </>
      ) : mayPropose ? (
        editing || !ident ? (
          <IdentificationForm observation={o} onDone={() => setEditing(false)} />
        ) : null
      ) : (
        <Text muted>No identification yet.</Text>
      )}
    </View>
  );
}

function IdentificationForm({ observation: o, onDone }: { observation: ObservationDetail; onDone: () => void }) {
  const { colors } = useTheme();
  const current = o.identificationDetail;
  const [name, setName] = useState(current?.scientificName ?? '');
  const [rank, setRank] = useState<(typeof taxonRanks)[number] | undefined>(current?.taxonRank ?? undefined);
  const [qualifier, setQualifier] = useState<(typeof identificationQualifiers)[number] | 'none'>(current?.qualifier ?? 'none');
  const [confidence, setConfidence] = useState<(typeof identificationConfidences)[number] | undefined>(current?.confidence ?? undefined);
  const [taxonId, setTaxonId] = useState(current?.taxonId ?? '');
  const save = useSetIdentification(o.id);
  const issue = (path: string) => (save.error instanceof ApiError ? save.error.issues.find((i) => i.path === path)?.message : undefined);
  return (
    <View style={styles.form}>
      <Field
        label="Scientific name"
        testID="field-scientific-name"
        value={name}
        onChangeText={setName}
        placeholder="e.g. Desmophyllum pertusum"
        error={issue('scientificName')}
        autoCapitalize="sentences"
      />
      <Segmented
        label="Qualifier"
        value={qualifier}
        onChange={setQualifier}
        options={[{ value: 'none', label: 'none' }, ...identificationQualifiers.map((q) => ({ value: q, label: q }))]}
      />
      <Segmented label="Rank" value={rank} onChange={setRank} options={taxonRanks.map((r) => ({ value: r, label: r }))} />
      <Segmented
        label="Confidence"
        value={confidence}
        onChange={setConfidence}
        options={identificationConfidences.map((c) => ({ value: c, label: c }))}
      />
      <Field
        label="Taxon identifier (optional)"
        value={taxonId}
        onChangeText={setTaxonId}
        placeholder="urn:lsid:… or a link"
        mono
        autoCapitalize="none"
        error={issue('taxonId')}
      />
      {save.error instanceof ApiError && save.error.issues.length === 0 ? <Text color={colors.danger}>{save.error.message}</Text> : null}
      <View style={styles.row}>
        <Button
          label="Save identification"
          testID="save-identification"
          busy={save.isPending}
          onPress={() =>
            save.mutate(
              {
                scientificName: name,
                taxonRank: rank ?? null,
                qualifier: qualifier === 'none' ? null : qualifier,
                confidence: confidence ?? null,
                taxonId: taxonId.trim() || null,
              },
              { onSuccess: onDone },
            )
          }
        />
        {current ? <Button label="Cancel" tone="ghost" onPress={onDone} /> : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  form: { gap: space.md },
  name: { fontStyle: 'italic' },
});
