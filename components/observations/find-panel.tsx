import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { nextFindNumberQuery, useAddCustody, useSetFind } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatUtc, parseUtcInput, toUtcInput } from '@/lib/format';
import { can, type AccessRole } from '@/lib/permissions';
import { SAMPLE_TAG, type ObservationDetail } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { useFormToggle, useVersionedSave, VersionedForm, type ConflictField } from './record-conflict';

type Props = { observation: ObservationDetail; myRole: AccessRole | undefined; myId: string | undefined };

/** The caution shown wherever a recovery is recorded. */
export function RecoveryCaution() {
  const { colors } = useTheme();
  return (
    <View style={[styles.caution, { borderColor: colors.warning }]} testID="recovery-caution" role="note">
      <Text variant="caption" color={colors.warning}>
        Recovering underwater cultural heritage needs a permit in most waters (and under the UNESCO 2001 Convention where it applies); this
        notebook records, it does not authorise. Keep a recovered artefact wet and hand it to a conservator at once. Biological samples can
        need permits too. Follow local law and licensed practice.
      </Text>
    </View>
  );
}

/** An archaeology entry's find: its number in the campaign's register, and where it is now. */
export function FindPanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const { editing, open, formKey, formProps } = useFormToggle();
  const mayEdit = can(myRole, 'find.edit', { isAuthor: o.authorId === myId });
  const find = o.find;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="find">
      <Text variant="label">Find</Text>
      {find && !editing ? (
        <>
          <Text variant="title" testID="find-number">
            {find.findNumber}
          </Text>
          <Text muted>
            {[find.objectType, find.material, find.condition, find.state === 'recovered' ? 'recovered' : 'left in situ']
              .filter(Boolean)
              .join(' · ')}
          </Text>
          {mayEdit ? (
            <View style={styles.actions}>
              <Button label="Correct the find" tone="secondary" compact onPress={open} testID="edit-find" />
            </View>
          ) : null}
        </>
      ) : mayEdit ? (
        <FindForm key={formKey} observation={o} {...formProps} />
      ) : (
        <Text muted>Not registered as a find.</Text>
      )}
      {myRole && !mayEdit ? (
        <Text variant="caption" muted testID="find-reason">
          Scientists, leads and the entry’s author register and correct finds.
        </Text>
      ) : null}
    </View>
  );
}

const stateLabel = { 'in-situ': 'in situ', recovered: 'recovered' } as const;

/**
 * Recording a find keeps the entry's version the form opened at. If someone else saved the entry
 * in between, the server refuses with 409 and this shows their find beside the one typed here:
 * "Keep mine" saves it over theirs knowingly, "Use theirs" drops the typing.
 */
function FindForm({ observation: o, onDone, onDiscard }: { observation: ObservationDetail; onDone: () => void; onDiscard: () => void }) {
  const current = o.find;
  const proposal = useQuery({ ...nextFindNumberQuery(o.campaignId), enabled: !current });
  const [number, setNumber] = useState(current?.findNumber ?? '');
  const [objectType, setObjectType] = useState(current?.objectType ?? '');
  const [material, setMaterial] = useState(current?.material ?? '');
  const [condition, setCondition] = useState(current?.condition ?? '');
  const [state, setState] = useState<'in-situ' | 'recovered'>(current?.state ?? 'in-situ');
  const value = number || proposal.data?.findNumber || '';
  const flow = useVersionedSave(
    o.version,
    useSetFind(o.id),
    (version) => ({
      version,
      findNumber: value,
      objectType: objectType || null,
      material: material || null,
      condition: condition || null,
      state,
    }),
    onDone,
  );
  const { typing } = flow;
  const tf = o.find;
  const conflictFields: ConflictField[] = [
    { key: 'findNumber', label: 'Find number', theirs: tf?.findNumber ?? 'not registered', mine: value.trim() },
    { key: 'objectType', label: 'Object type', theirs: tf?.objectType ?? '', mine: objectType.trim() },
    { key: 'material', label: 'Material', theirs: tf?.material ?? '', mine: material.trim() },
    { key: 'condition', label: 'Condition', theirs: tf?.condition ?? '', mine: condition.trim() },
    { key: 'state', label: 'State', theirs: tf ? stateLabel[tf.state] : '', mine: stateLabel[state] },
  ];
  return (
    <VersionedForm
      flow={flow}
      what="find"
      conflictFields={conflictFields}
      onDiscard={onDiscard}
      save={{ label: 'Save find', testID: 'save-find', errorTestID: 'find-error', onCancel: current ? onDone : undefined }}
    >
      <Field
        label="Find number"
        testID="field-find-number"
        value={value}
        onChangeText={typing(setNumber)}
        mono
        autoCapitalize="characters"
        hint={!current && proposal.data ? 'The next free number is proposed.' : undefined}
        error={flow.issue('findNumber')}
      />
      <Field label="Object type" value={objectType} onChangeText={typing(setObjectType)} hint="What it is: an amphora, a bowl, a timber…" />
      <Field label="Material" value={material} onChangeText={typing(setMaterial)} hint="What it is made of" />
      <Field label="Condition" value={condition} onChangeText={typing(setCondition)} hint="Whole, broken, worn…" />
      <Segmented
        label="State"
        value={state}
        onChange={typing(setState)}
        options={[
          { value: 'in-situ', label: 'In situ' },
          { value: 'recovered', label: 'Recovered' },
        ]}
        testID="field-find-state"
      />
      {state === 'recovered' ? <RecoveryCaution /> : null}
    </VersionedForm>
  );
}

/** Why this person may not add to the trail, by the server's rule; null when they may. */
function custodyRefusal(o: ObservationDetail, myRole: string, myId: string | undefined): string | null {
  if (o.retired) return 'The trail of a retired entry is closed until a lead restores it.';
  if (myRole === 'admin') return 'Only members of the campaign record hand-overs.';
  if (myRole === 'guest' && o.authorId !== myId) return 'Guests record hand-overs only on their own entries.';
  return null;
}

/** Who has held a recovered find or a sample, and where it is kept: append-only. */
export function CustodyPanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const [adding, setAdding] = useState(false);
  const [holder, setHolder] = useState('');
  const [since, setSince] = useState(() => toUtcInput(new Date().toISOString()));
  const [location, setLocation] = useState('');
  const [container, setContainer] = useState('');
  const add = useAddCustody(o.id);
  const inCustody =
    o.find?.state === 'recovered' || o.sample !== null || o.tags.some((t) => t.toLowerCase() === SAMPLE_TAG) || o.custody.length > 0;
  if (!inCustody) return null;
  const sinceIso = parseUtcInput(since);
  // Until the campaign says what this person is, neither the form nor a reason shows.
  const refusal = myRole === undefined ? undefined : custodyRefusal(o, myRole, myId);
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="custody">
      <Text variant="label">Custody trail</Text>
      {o.custody.length === 0 ? <Text muted>Nobody has recorded holding it yet.</Text> : null}
      {o.custody.map((c) => (
        <View key={c.id} style={styles.step}>
          <Text variant="monoSmall">{formatUtc(c.since)}</Text>
          <Text>
            {c.holder} · {c.location}
            {c.container ? ` · ${c.container}` : ''}
          </Text>
          {c.note ? <Text muted>{c.note}</Text> : null}
          <Text variant="caption" muted>
            recorded by {c.recordedByName}
          </Text>
        </View>
      ))}
      {refusal ? (
        <Text variant="caption" muted testID="custody-reason">
          {refusal}
        </Text>
      ) : refusal === undefined ? null : adding ? (
        <View style={styles.form}>
          <RecoveryCaution />
          <Field label="Held by" testID="field-custody-holder" value={holder} onChangeText={setHolder} />
          <Field
            label="Since (UTC)"
            value={since}
            onChangeText={setSince}
            mono
            error={sinceIso ? undefined : 'Type a UTC time like 2026-05-16 23:10:00'}
          />
          <Field
            label="Kept at"
            testID="field-custody-location"
            value={location}
            onChangeText={setLocation}
            hint="The room, tank or store it is in"
          />
          <Field label="Container or label" value={container} onChangeText={setContainer} hint="The bag, box or label it carries" />
          {add.error instanceof ApiError ? <Text color={colors.danger}>{add.error.message}</Text> : null}
          <Button
            label="Add to the trail"
            testID="save-custody"
            busy={add.isPending}
            disabled={!sinceIso}
            onPress={() =>
              sinceIso &&
              add.mutate({ holder, since: sinceIso, location, container: container || null }, { onSuccess: () => setAdding(false) })
            }
          />
        </View>
      ) : (
        <View style={styles.actions}>
          <Button label="Record a hand-over" tone="secondary" compact onPress={() => setAdding(true)} testID="add-custody" />
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  // Actions of the same weight look the same: a secondary button at the start of its own row.
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  form: { gap: space.md },
  step: { gap: 2, paddingVertical: space.xs },
  caution: { borderLeftWidth: 3, paddingLeft: space.md, paddingVertical: space.xs },
});
