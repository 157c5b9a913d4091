import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { NameField } from '@/components/taxa/name-field';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useSetIdentification, useVerifyIdentification } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatScientificName, formatUtc } from '@/lib/format';
import { can, type AccessRole } from '@/lib/permissions';
import { identificationConfidences, identificationQualifiers, taxonRanks, type ObservationDetail } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { useFormToggle, useVersionedSave, VersionedForm, type ConflictField } from './record-conflict';

type Props = { observation: ObservationDetail; myRole: AccessRole | undefined; myId: string | undefined };

const statusLabel = { unverified: 'Not verified yet', verified: 'Verified', disputed: 'Disputed' } as const;

/** A biology entry's identification: the proposed name, and its verification by someone else. */
export function IdentificationPanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const ident = o.identificationDetail;
  const { editing, open, formKey, formProps } = useFormToggle();
  const verify = useVerifyIdentification(o.id);
  const isAuthor = o.authorId === myId;
  const mayPropose = can(myRole, 'identification.propose', { isAuthor });
  // Nobody verifies a name they proposed or an entry they wrote, leads included (the permission table's rule).
  const mayVerify = !!ident && can(myRole, 'identification.verify', { isAuthor, isIdentifier: ident.identifiedBy === myId });
  // What this person cannot do here, and why, as the server rules it.
  const reason = !myRole
    ? null
    : !ident
      ? mayPropose
        ? null
        : 'Scientists, leads and the entry’s author propose names.'
      : mayVerify
        ? null
        : myRole === 'lead' || myRole === 'scientist'
          ? 'You proposed this name or wrote this entry, so another scientist or a lead verifies it.'
          : 'Scientists and leads verify names.';
  // The version on screen goes with the verdict: a name changed meanwhile is not verified blind.
  const judge = (status: 'verified' | 'disputed') => verify.mutate({ version: o.version, status });
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
                <Button label="Verify" compact busy={verify.isPending} onPress={() => judge('verified')} testID="verify" />
                <Button
                  label="Dispute"
                  tone="secondary"
                  compact
                  busy={verify.isPending}
                  onPress={() => judge('disputed')}
                  testID="dispute"
                />
              </>
            ) : null}
            {mayPropose ? <Button label="Change name" tone="secondary" compact onPress={open} testID="edit-identification" /> : null}
          </View>
          {verify.error instanceof ApiError ? (
            <Text color={colors.danger} role="alert" testID="verify-error">
              {verify.error.code === 'stale_version'
                ? 'Someone else changed this entry while you were looking, so nothing was recorded. Check the identification shown now and verify or dispute it again.'
                : verify.error.message}
            </Text>
          ) : null}
        </>
      ) : mayPropose ? (
        editing ? (
          <IdentificationForm key={formKey} observation={o} {...formProps} />
        ) : (
          // An entry with no name yet starts with the form folded away, so the entry reads first.
          <View style={styles.row}>
            <Text muted style={styles.grow}>
              No identification yet.
            </Text>
            <Button label="Add an identification" tone="secondary" compact onPress={open} testID="add-identification" />
          </View>
        )
      ) : (
        <Text muted>No identification yet.</Text>
      )}
      {reason && !editing ? (
        <Text variant="caption" muted testID="identification-reason">
          {reason}
        </Text>
      ) : null}
    </View>
  );
}

type FormProps = { observation: ObservationDetail; onDone: () => void; onDiscard: () => void };

/**
 * Proposing a name keeps the entry's version the form opened at. If someone else saved the entry
 * in between, the server refuses with 409 and this shows their identification beside the one
 * typed here: "Keep mine" saves it over theirs knowingly, "Use theirs" drops the typing.
 */
function IdentificationForm({ observation: o, onDone, onDiscard }: FormProps) {
  const current = o.identificationDetail;
  const [name, setName] = useState(current?.scientificName ?? '');
  const [rank, setRank] = useState<(typeof taxonRanks)[number] | undefined>(current?.taxonRank ?? undefined);
  const [qualifier, setQualifier] = useState<(typeof identificationQualifiers)[number] | 'none'>(current?.qualifier ?? 'none');
  const [confidence, setConfidence] = useState<(typeof identificationConfidences)[number] | undefined>(current?.confidence ?? undefined);
  const [taxonId, setTaxonId] = useState(current?.taxonId ?? '');
  const flow = useVersionedSave(
    o.version,
    useSetIdentification(o.id),
    (version) => ({
      version,
      scientificName: name,
      taxonRank: rank ?? null,
      qualifier: qualifier === 'none' ? null : qualifier,
      confidence: confidence ?? null,
      taxonId: taxonId.trim() || null,
    }),
    onDone,
  );
  const { typing } = flow;
  const ti = o.identificationDetail;
  const mineName = formatScientificName(name, qualifier === 'none' ? null : qualifier);
  const keepsVerdict = !!ti && ti.scientificName === name.trim() && ti.qualifier === (qualifier === 'none' ? null : qualifier);
  const conflictFields: ConflictField[] = [
    {
      key: 'name',
      label: 'Scientific name',
      theirs: ti ? formatScientificName(ti.scientificName, ti.qualifier) : 'no identification',
      mine: mineName,
    },
    { key: 'rank', label: 'Rank', theirs: ti?.taxonRank ?? '', mine: rank ?? '' },
    { key: 'confidence', label: 'Confidence', theirs: ti?.confidence ?? '', mine: confidence ?? '' },
    { key: 'taxonId', label: 'Taxon identifier', theirs: ti?.taxonId ?? '', mine: taxonId.trim() },
    {
      key: 'verification',
      label: 'Verification',
      theirs: ti ? statusLabel[ti.verificationStatus] : '',
      mine: ti && keepsVerdict ? statusLabel[ti.verificationStatus] : statusLabel.unverified,
    },
  ];
  return (
    <VersionedForm
      flow={flow}
      what="identification"
      conflictFields={conflictFields}
      onDiscard={onDiscard}
      save={{ label: 'Save identification', testID: 'save-identification', onCancel: onDone }}
    >
      <NameField
        campaignId={o.campaignId}
        value={name}
        onChange={typing(setName)}
        onPick={(s) => {
          const listed = taxonRanks.find((r) => r === s.taxonRank);
          if (listed) setRank(listed);
          if (s.identifier && !taxonId) setTaxonId(s.identifier);
        }}
        error={flow.issue('scientificName')}
      />
      <Segmented
        label="Qualifier"
        value={qualifier}
        onChange={typing(setQualifier)}
        options={[{ value: 'none', label: 'none' }, ...identificationQualifiers.map((q) => ({ value: q, label: q }))]}
      />
      <Segmented label="Rank" value={rank} onChange={typing(setRank)} options={taxonRanks.map((r) => ({ value: r, label: r }))} />
      <Segmented
        label="Confidence"
        value={confidence}
        onChange={typing(setConfidence)}
        options={identificationConfidences.map((c) => ({ value: c, label: c }))}
      />
      <Field
        label="Taxon identifier (optional)"
        value={taxonId}
        onChangeText={typing(setTaxonId)}
        hint="An LSID (urn:lsid:…) or a link to the name in a checklist"
        mono
        autoCapitalize="none"
        error={flow.issue('taxonId')}
      />
    </VersionedForm>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  grow: { flexGrow: 1, flexShrink: 1 },
  form: { gap: space.md },
  name: { fontStyle: 'italic' },
});
