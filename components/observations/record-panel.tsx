import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useUpdateObservation } from '@/hooks/observations';
import { useNextSampleNumber, useSetSample, useSubstrates } from '@/hooks/taxa';
import { useTheme } from '@/hooks/theme';
import { can, type AccessRole } from '@/lib/permissions';
import {
  organismQuantityTypes,
  sampleGear,
  samplePreservations,
  sampleTypes,
  sizeDimensions,
  type ObservationDetail,
  type OrganismQuantityType,
  type SampleType,
  type Size,
  type SizeInput,
} from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

type Props = { observation: ObservationDetail; myRole: AccessRole | undefined; myId: string | undefined };

const sizeWord = (s: Size) => `${s.dimension} ${s.valueCm} cm${s.method === 'estimated' ? ' (estimated)' : ''}`;

/** What the entry says of the organism beyond its name: count or cover, sizes, and what it sits on. */
export function RecordPanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const [editing, setEditing] = useState(false);
  const mayEdit = can(myRole, 'entry.edit', { isAuthor: o.authorId === myId }) && !o.retired;
  const biology = o.kind === 'biology';
  const quantity =
    o.individualCount !== null
      ? `${o.individualCount} counted`
      : o.organismQuantity !== null
        ? `${o.organismQuantity} ${o.organismQuantityType ?? ''}`.trim()
        : null;
  const facts = [biology ? quantity : null, ...(biology ? o.sizes.map(sizeWord) : []), o.substrate ? `on ${o.substrate}` : null].filter(
    (f): f is string => !!f,
  );
  if (!biology && !o.substrate && !mayEdit) return null;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="record-panel">
      <Text variant="label">{biology ? 'Count, size and substrate' : 'Substrate'}</Text>
      {editing ? (
        <RecordForm observation={o} onDone={() => setEditing(false)} />
      ) : (
        <>
          {facts.length > 0 ? (
            <Text testID="record-facts">{facts.join(' · ')}</Text>
          ) : (
            <Text muted>{biology ? 'Not counted or measured yet.' : 'No substrate named.'}</Text>
          )}
          {mayEdit ? (
            <Button
              label={facts.length > 0 ? 'Correct these' : biology ? 'Add a count or size' : 'Name the substrate'}
              tone="secondary"
              compact
              testID="edit-record"
              onPress={() => setEditing(true)}
            />
          ) : null}
        </>
      )}
    </View>
  );
}

type SizeDraft = { value: string; method: 'measured' | 'estimated' };

function RecordForm({ observation: o, onDone }: { observation: ObservationDetail; onDone: () => void }) {
  const { colors } = useTheme();
  const update = useUpdateObservation(o.id);
  const substrates = useSubstrates(o.campaignId);
  const biology = o.kind === 'biology';
  const [mode, setMode] = useState<'count' | 'quantity'>(o.organismQuantity !== null ? 'quantity' : 'count');
  const [count, setCount] = useState(o.individualCount === null ? '' : String(o.individualCount));
  const [quantity, setQuantity] = useState(o.organismQuantity === null ? '' : String(o.organismQuantity));
  const [quantityType, setQuantityType] = useState<OrganismQuantityType>(o.organismQuantityType ?? '% cover');
  const [sizes, setSizes] = useState<Record<string, SizeDraft>>(() =>
    Object.fromEntries(o.sizes.map((s) => [s.dimension, { value: String(s.valueCm), method: s.method }])),
  );
  const [substrate, setSubstrate] = useState<string | null>(o.substrate);
  const number = (text: string) => (text.trim() === '' ? null : Number(text.replace(',', '.')));
  const issue = (path: string) =>
    update.error instanceof ApiError
      ? update.error.issues.find((i) => i.path === path || i.path.startsWith(`${path}.`))?.message
      : undefined;
  const save = () => {
    const sizeList: SizeInput[] = sizeDimensions.flatMap((d) => {
      const s = sizes[d];
      const v = s ? number(s.value) : null;
      return s && v !== null ? [{ dimension: d, valueCm: v, method: s.method }] : [];
    });
    update.mutate(
      {
        version: o.version,
        ...(biology
          ? {
              individualCount: mode === 'count' ? number(count) : null,
              organismQuantity: mode === 'quantity' ? number(quantity) : null,
              organismQuantityType: mode === 'quantity' && number(quantity) !== null ? quantityType : null,
              sizes: sizeList,
            }
          : {}),
        substrate,
      },
      { onSuccess: onDone },
    );
  };
  const offered = (substrates.data?.items ?? []).filter((s) => !s.retired || s.name === o.substrate);
  return (
    <View style={styles.form}>
      {biology ? (
        <>
          <Segmented
            label="How many"
            value={mode}
            onChange={setMode}
            options={[
              { value: 'count', label: 'A count' },
              { value: 'quantity', label: 'Cover or density' },
            ]}
            testID="record-mode"
          />
          {mode === 'count' ? (
            <Field
              label="Individuals counted"
              testID="field-individual-count"
              value={count}
              onChangeText={setCount}
              keyboardType="number-pad"
              error={issue('individualCount')}
              hint="Whole individuals seen; leave empty when not counted."
            />
          ) : (
            <>
              <Field
                label="Quantity"
                testID="field-organism-quantity"
                value={quantity}
                onChangeText={setQuantity}
                keyboardType="decimal-pad"
                error={issue('organismQuantity') ?? issue('organismQuantityType')}
              />
              <Segmented
                label="Quantity is"
                value={quantityType}
                onChange={setQuantityType}
                options={organismQuantityTypes.map((t) => ({ value: t, label: t }))}
                testID="field-quantity-type"
              />
            </>
          )}
          <Text variant="label">Size (cm)</Text>
          {sizeDimensions.map((d) => {
            const s = sizes[d] ?? { value: '', method: 'estimated' as const };
            return (
              <View key={d} style={styles.sizeRow}>
                <View style={styles.sizeValue}>
                  <Field
                    label={d[0]!.toUpperCase() + d.slice(1)}
                    testID={`field-size-${d}`}
                    value={s.value}
                    onChangeText={(value) => setSizes((all) => ({ ...all, [d]: { ...s, value } }))}
                    keyboardType="decimal-pad"
                    error={issue('sizes')}
                  />
                </View>
                <Segmented
                  label={`${d} is`}
                  hideLabel
                  value={s.method}
                  onChange={(method) => setSizes((all) => ({ ...all, [d]: { ...s, method } }))}
                  options={[
                    { value: 'measured', label: 'Measured' },
                    { value: 'estimated', label: 'Estimated' },
                  ]}
                  testID={`field-size-${d}-method`}
                />
              </View>
            );
          })}
        </>
      ) : null}
      <Text variant="label">Substrate</Text>
      <View style={styles.chips} testID="field-substrate">
        <Chip label="None" selected={substrate === null} onPress={() => setSubstrate(null)} />
        {offered.map((s) => (
          <Chip
            key={s.id}
            label={s.name}
            selected={substrate === s.name}
            onPress={() => setSubstrate(s.name)}
            testID={`substrate-${s.name}`}
          />
        ))}
      </View>
      {issue('substrate') ? <Text color={colors.danger}>{issue('substrate')}</Text> : null}
      {update.error instanceof ApiError && update.error.issues.length === 0 ? (
        <Text color={colors.danger}>{update.error.message}</Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Save" testID="save-record" busy={update.isPending} onPress={save} />
        <Button label="Cancel" tone="ghost" onPress={onDone} />
      </View>
    </View>
  );
}

/** A biology or environment entry's sample in the campaign's register, and the form to record it. */
export function SamplePanel({ observation: o, myRole, myId }: Props) {
  const { colors } = useTheme();
  const [editing, setEditing] = useState(false);
  if (o.kind !== 'biology' && o.kind !== 'environment') return null;
  const mayEdit = can(myRole, 'sample.edit', { isAuthor: o.authorId === myId }) && !o.retired;
  const s = o.sample;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="sample-panel">
      <Text variant="label">Sample</Text>
      {editing ? (
        <SampleForm observation={o} onDone={() => setEditing(false)} />
      ) : s ? (
        <>
          <Text variant="title" testID="sample-number">
            {s.sampleNumber}
          </Text>
          <Text muted>
            {[
              s.sampleType,
              s.gear,
              s.container ? `stowed in ${s.container}` : null,
              s.preservation,
              s.parentSampleNumber ? `subsample of ${s.parentSampleNumber}` : null,
              s.lab ? `for ${s.lab}` : null,
            ]
              .filter(Boolean)
              .join(' · ')}
          </Text>
          {o.custody.length === 0 ? (
            <Text variant="caption" color={colors.warning} testID="sample-no-custody">
              No custody step recorded yet: say who holds it once it is on deck.
            </Text>
          ) : null}
          {mayEdit ? <Button label="Correct the sample" tone="secondary" compact onPress={() => setEditing(true)} /> : null}
        </>
      ) : (
        <>
          <Text muted>No sample taken.</Text>
          {mayEdit ? (
            <Button label="Record a sample" tone="secondary" compact testID="add-sample" onPress={() => setEditing(true)} />
          ) : null}
        </>
      )}
    </View>
  );
}

function SampleForm({ observation: o, onDone }: { observation: ObservationDetail; onDone: () => void }) {
  const { colors } = useTheme();
  const set = useSetSample(o.id);
  const s = o.sample;
  const proposal = useNextSampleNumber(o.campaignId, !s);
  const [typedNumber, setNumber] = useState(s?.sampleNumber ?? '');
  const sampleNumber = typedNumber || proposal.data?.sampleNumber || '';
  const [sampleType, setType] = useState<SampleType>(s?.sampleType ?? (o.kind === 'biology' ? 'biological' : 'water'));
  const [gear, setGear] = useState(s?.gear ?? '');
  const [container, setContainer] = useState(s?.container ?? '');
  const [preservation, setPreservation] = useState(s?.preservation ?? '');
  const [parent, setParent] = useState(s?.parentSampleNumber ?? '');
  const [lab, setLab] = useState(s?.lab ?? '');
  const issue = (path: string) => (set.error instanceof ApiError ? set.error.issues.find((i) => i.path === path)?.message : undefined);
  const orNull = (v: string) => (v.trim() === '' ? null : v.trim());
  return (
    <View style={styles.form}>
      <Field
        label="Sample number"
        testID="field-sample-number"
        value={sampleNumber}
        onChangeText={setNumber}
        mono
        autoCapitalize="characters"
        error={issue('sampleNumber')}
        hint={!s && proposal.data ? 'The next free number is proposed; numbers are unique in the campaign.' : 'Unique in the campaign.'}
      />
      <Segmented
        label="Sample of"
        value={sampleType}
        onChange={setType}
        options={sampleTypes.map((t) => ({ value: t, label: t }))}
        testID="field-sample-type"
      />
      <Field label="Gear" value={gear} onChangeText={setGear} hint={`For example: ${sampleGear.join(', ')}`} testID="field-sample-gear" />
      <View style={styles.chips}>
        {sampleGear.map((g) => (
          <Chip key={g} label={g} selected={gear === g} onPress={() => setGear(g)} />
        ))}
      </View>
      <Field label="Stowed in" value={container} onChangeText={setContainer} hint="The container or slot on the vehicle" />
      <Field label="Preservation" value={preservation} onChangeText={setPreservation} testID="field-sample-preservation" />
      <View style={styles.chips}>
        {samplePreservations.map((p) => (
          <Chip key={p} label={p} selected={preservation === p} onPress={() => setPreservation(p)} />
        ))}
      </View>
      <Field
        label="Subsample of"
        value={parent}
        onChangeText={setParent}
        mono
        autoCapitalize="characters"
        hint="The parent's sample number, for a subsample"
        error={issue('parentSampleNumber')}
      />
      <Field label="Receiving lab" value={lab} onChangeText={setLab} />
      {set.error instanceof ApiError && set.error.issues.length === 0 ? (
        <Text color={colors.danger} testID="sample-error">
          {set.error.message}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button
          label="Save sample"
          testID="save-sample"
          busy={set.isPending}
          onPress={() =>
            set.mutate(
              {
                sampleNumber: sampleNumber.trim(),
                sampleType,
                gear: orNull(gear),
                container: orNull(container),
                preservation: orNull(preservation),
                parentSampleNumber: orNull(parent),
                lab: orNull(lab),
              },
              { onSuccess: onDone },
            )
          }
        />
        <Button label="Cancel" tone="ghost" onPress={onDone} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  form: { gap: space.md },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  sizeRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'flex-end' },
  sizeValue: { minWidth: 140, flexGrow: 1, flexBasis: 140 },
});
