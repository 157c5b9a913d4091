import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import { radius, space } from '@/lib/tokens';

/**
 * The version a form's save answers: the entry's current one until something is typed (so a form
 * left open follows the entry), then the one typing started at, then the one a "Keep mine" chose.
 * Wrap each field's setter in `typing`.
 */
export function useEditBase(version: number) {
  const [typedAt, setBaseVersion] = useState<number | null>(null);
  const typing =
    <T,>(set: (v: T) => void) =>
    (v: T) => {
      setBaseVersion((b) => b ?? version);
      set(v);
    };
  return { baseVersion: typedAt ?? version, setBaseVersion, typing };
}

export const isStale = (err: unknown) => err instanceof ApiError && err.code === 'stale_version';

/** The message the server gave a field, for the field to show. */
export const fieldIssue = (err: unknown, path: string) =>
  err instanceof ApiError ? err.issues.find((i) => i.path === path)?.message : undefined;

type SaveMutation<I> = {
  mutate: (input: I, callbacks: { onSuccess: () => void; onError: (err: unknown) => void }) => void;
  isPending: boolean;
  error: unknown;
};

/**
 * The save of a part of an entry (its identification, its find) that carries the version the
 * form opened at. If someone else saved the entry in between, the server refuses with 409: the
 * form then waits for the entry to be fetched again and offers their version beside the one
 * typed here (`theirsArrived`), to keep knowingly (`send(theirVersion)`) or drop.
 */
export function useVersionedSave<I>(version: number, save: SaveMutation<I>, body: (version: number) => I, onDone: () => void) {
  const { baseVersion, setBaseVersion, typing } = useEditBase(version);
  // The version a refused save started from; the panel shows once the entry has been fetched again.
  const [refusedFrom, setRefusedFrom] = useState<number | null>(null);
  const send = (from: number) => {
    setBaseVersion(from);
    save.mutate(body(from), { onSuccess: onDone, onError: (err) => setRefusedFrom(isStale(err) ? from : null) });
  };
  const failure = save.error instanceof ApiError && save.error.issues.length === 0 && !isStale(save.error) ? save.error.message : null;
  return {
    version,
    typing,
    send,
    baseVersion: refusedFrom ?? baseVersion,
    refused: refusedFrom !== null,
    theirsArrived: refusedFrom !== null && version !== refusedFrom,
    busy: save.isPending,
    issue: (path: string) => fieldIssue(save.error, path),
    failure,
  };
}

type Flow = ReturnType<typeof useVersionedSave>;

/**
 * Above the form: the conflict panel once their version is here ("Keep mine" saves over it, "Use
 * theirs" drops the typing), a waiting line until then.
 */
export function ConflictSlot({
  flow,
  what,
  fields,
  onDiscard,
}: {
  flow: Flow;
  what: string;
  fields: ConflictField[];
  onDiscard: () => void;
}) {
  if (flow.theirsArrived) {
    return (
      <RecordConflict
        what={what}
        testID={`${what}-conflict`}
        theirVersion={flow.version}
        baseVersion={flow.baseVersion}
        fields={fields}
        busy={flow.busy}
        onKeepMine={() => flow.send(flow.version)}
        onTakeTheirs={onDiscard}
      />
    );
  }
  if (!flow.refused) return null;
  return (
    <View style={styles.row}>
      <Text muted>Someone else changed this entry; fetching their version…</Text>
      <Button label="Cancel" tone="ghost" compact onPress={onDiscard} />
    </View>
  );
}

/**
 * Whether a panel's form is open, and the props that open form takes: done closes it; discard
 * closes it and starts the next one afresh (a new key), its typing thrown away for someone else's version.
 */
export function useFormToggle() {
  const [editing, setEditing] = useState(false);
  const [formKey, setFormKey] = useState(0);
  const formProps = {
    onDone: () => setEditing(false),
    onDiscard: () => {
      setEditing(false);
      setFormKey((k) => k + 1);
    },
  };
  return { editing, open: () => setEditing(true), formKey, formProps };
}

/** A versioned form: the conflict slot above its fields, the save row below. */
export function VersionedForm({
  flow,
  what,
  conflictFields,
  onDiscard,
  save,
  children,
}: {
  flow: Flow;
  what: string;
  conflictFields: ConflictField[];
  onDiscard: () => void;
  save: { label: string; testID: string; errorTestID?: string; onCancel?: () => void };
  children: ReactNode;
}) {
  return (
    <View style={styles.form}>
      <ConflictSlot flow={flow} what={what} fields={conflictFields} onDiscard={onDiscard} />
      {children}
      <VersionedSaveRow flow={flow} {...save} />
    </View>
  );
}

/** Below the form: what went wrong that no field names, then Save (hidden while a conflict is open) and Cancel. */
export function VersionedSaveRow({
  flow,
  label,
  testID,
  errorTestID,
  onCancel,
}: {
  flow: Flow;
  label: string;
  testID: string;
  errorTestID?: string;
  onCancel?: () => void;
}) {
  const { colors } = useTheme();
  return (
    <>
      {flow.failure ? (
        <Text color={colors.danger} role="alert" testID={errorTestID}>
          {flow.failure}
        </Text>
      ) : null}
      {flow.refused ? null : (
        <View style={styles.row}>
          <Button label={label} testID={testID} busy={flow.busy} onPress={() => flow.send(flow.baseVersion)} />
          {onCancel ? <Button label="Cancel" tone="ghost" onPress={onCancel} /> : null}
        </View>
      )}
    </>
  );
}

export type FieldChoice = 'mine' | 'theirs';

export type ConflictField = {
  key: string;
  label: string;
  theirs: string;
  mine: string;
  /** Set where the field is chosen on its own (a three-way merge); absent where the whole record is kept or dropped. */
  choice?: FieldChoice;
  onChoose?: (choice: FieldChoice) => void;
};

type Props = {
  /** Names what was being saved, e.g. "identification". */
  what: string;
  testID: string;
  theirVersion: number;
  baseVersion: number;
  /** Who saved the other version, and when, where it is known. */
  changedBy?: { name: string; at: string } | null;
  fields: ConflictField[];
  busy: boolean;
  onKeepMine: () => void;
  onTakeTheirs: () => void;
};

/**
 * A save refused because someone else changed the entry first (an edit, an identification, a
 * find): their values beside the ones typed here, and the choice between them, the same panel
 * everywhere so the same situation reads the same. Where the fields are chosen one by one, only
 * the fields both people changed are listed; the rest were already taken from whoever changed them.
 */
export function RecordConflict({ what, testID, theirVersion, baseVersion, changedBy, fields, busy, onKeepMine, onTakeTheirs }: Props) {
  const { colors } = useTheme();
  const differing = fields.filter((f) => f.theirs !== f.mine);
  const perField = differing.some((f) => f.onChoose);
  const who = changedBy ? `${changedBy.name} saved it at ${formatUtc(changedBy.at)}` : 'Someone else saved it';
  return (
    <View style={[styles.conflict, { borderColor: colors.warning, backgroundColor: colors.surface }]} testID={testID} role="alert">
      <Text variant="title">Someone else changed this entry</Text>
      <Text muted testID={`${testID}-by`}>
        {who}: it is now at version {theirVersion}; your {what} started from version {baseVersion}. Nothing has been overwritten.{' '}
        {perField ? 'What only one of you changed is kept. Choose for each field you both changed.' : 'Choose what to keep.'}
      </Text>
      {differing.length === 0 ? <Text>Your {what} and theirs agree.</Text> : null}
      {differing.map((f) => (
        <View key={f.key} style={styles.clash} testID={`${testID}-${f.key}`}>
          <Text variant="label">{f.label}</Text>
          <View style={styles.sides}>
            <View style={[styles.side, { borderColor: f.choice === 'theirs' ? colors.accent : colors.border }]}>
              <Text variant="caption" muted>
                Theirs
              </Text>
              <Text testID={`${testID}-theirs-${f.key}`}>{f.theirs || '—'}</Text>
            </View>
            <View style={[styles.side, { borderColor: f.choice === 'theirs' ? colors.border : colors.accent }]}>
              <Text variant="caption" muted>
                Yours
              </Text>
              <Text testID={`${testID}-mine-${f.key}`}>{f.mine || '—'}</Text>
            </View>
          </View>
          {f.onChoose ? (
            <Segmented
              label={`Keep for ${f.label.toLowerCase()}`}
              value={f.choice ?? 'mine'}
              onChange={f.onChoose}
              options={[
                { value: 'mine', label: 'Yours' },
                { value: 'theirs', label: 'Theirs' },
              ]}
              testID={`${testID}-choose-${f.key}`}
            />
          ) : null}
        </View>
      ))}
      <View style={styles.row}>
        <Button label={perField ? 'Save these' : 'Keep mine'} testID={`${testID}-keep-mine`} busy={busy} onPress={onKeepMine} />
        <Button label={perField ? 'Drop my edit' : 'Use theirs'} tone="secondary" testID={`${testID}-take-theirs`} onPress={onTakeTheirs} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  conflict: { borderWidth: 2, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  clash: { gap: space.xs },
  sides: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  side: { flex: 1, minWidth: 140, borderWidth: 1, borderRadius: radius.md, padding: space.sm, gap: 2 },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  form: { gap: space.md },
});
