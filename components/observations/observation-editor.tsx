import { useEffect, useState } from 'react';
import { View } from 'react-native';

import { Button } from '@/components/ui/button';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useDraft } from '@/hooks/draft';
import { useFollowDive } from '@/hooks/live';
import { useObservation, useRevisions, useUpdateObservation } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import type { ObservationDetail } from '@/lib/schemas';
import {
  changes,
  draftFromObservation,
  draftLabels,
  errorsAfterChange,
  mergeEdit,
  resolveClashes,
  type Draft,
  type FormErrors,
} from './entry-draft';
import { RecordConflict, type ConflictField, type FieldChoice } from './record-conflict';
import { errorsFromServer, formStyles, ObservationFields } from './observation-form';

/** The form as typed, the version the edit is based on, and the entry as it stood at that version. */
type EditDraft = Draft & { baseVersion: number; base?: Base };
type Base = { version: number; fields: Draft };
const baseOf = (o: ObservationDetail): Base => ({ version: o.version, fields: draftFromObservation(o) });

export function ObservationEditor({ id, onDone }: { id: string; onDone: () => void }) {
  const observation = useObservation(id);
  useFollowDive(observation.data?.diveId);
  if (observation.isPending) return <LoadingState label="Loading the entry…" />;
  if (observation.isError) return <ErrorState error={observation.error} onRetry={() => void observation.refetch()} />;
  return <Editor key={observation.data.id} current={observation.data} refetch={() => observation.refetch()} onDone={onDone} />;
}

type EditorProps = { current: ObservationDetail; refetch: () => Promise<{ data?: ObservationDetail }>; onDone: () => void };

/**
 * Editing keeps the entry as it stood when the edit began (`base`). When someone else saves in
 * between (seen live, or on a save the server refused as stale), their save is merged three ways:
 * what only they changed comes into the form, what only this editor changed stays, and only a
 * field both changed to different values is offered as a choice, each on its own. Nothing is
 * overwritten without the editor seeing what they would overwrite.
 */
function Editor({ current, refetch, onDone }: EditorProps) {
  const { colors } = useTheme();
  const draft = useDraft<EditDraft>(`bathynote.edit.${current.id}`, () => ({
    ...draftFromObservation(current),
    baseVersion: current.version,
    base: baseOf(current),
  }));
  const [errors, setErrors] = useState<FormErrors>({});
  const [takeTheirs, setTakeTheirs] = useState<ReadonlySet<keyof Draft>>(new Set());
  const save = useUpdateObservation(current.id);
  const { baseVersion, base: kept, ...value } = draft.value;
  // A draft kept by an earlier version of the app has no base of its own to merge from.
  const base = kept?.version === baseVersion ? kept.fields : undefined;
  const theirs = draftFromObservation(current);
  const moved = current.version !== baseVersion;
  const { merged, clashes } = moved ? mergeEdit(base, theirs, value) : { merged: value, clashes: [] as (keyof Draft)[] };
  const asking = clashes.length > 0;
  const revisions = useRevisions(current.id, asking);
  const latest = revisions.data?.find((r) => r.version === current.version);
  const update = draft.update;

  /** Saves `d`, an edit of `from` (the entry as `d` was based on it), over the version `against`. */
  const send = (d: Draft, from: Draft | undefined, against: ObservationDetail) => {
    const body = changes(d, against, against.version);
    if (!('version' in body)) {
      setErrors(body);
      return;
    }
    setErrors({});
    save.mutate(body, {
      onSuccess: () => {
        draft.clear();
        onDone();
      },
      onError: (err) => {
        if (!(err instanceof ApiError && err.code === 'stale_version')) return setErrors(errorsFromServer(err));
        // Someone saved first: their version is fetched and merged; with nothing to choose, the
        // merged edit goes out again at once, otherwise the panel asks.
        void refetch().then(({ data: fresh }) => {
          if (!fresh || fresh.version === against.version) return;
          const next = mergeEdit(from, draftFromObservation(fresh), d);
          if (next.clashes.length > 0) return;
          update({ ...next.merged, baseVersion: fresh.version, base: baseOf(fresh) });
          send(next.merged, draftFromObservation(fresh), fresh);
        });
      },
    });
  };

  // A save seen live that needs no choice comes into the form, which is now based on that version.
  useEffect(() => {
    if (moved && !asking) update({ ...merged, baseVersion: current.version, base: baseOf(current) });
  });

  const resolve = () => {
    const chosen = resolveClashes(merged, value, clashes, takeTheirs);
    update({ ...chosen, baseVersion: current.version, base: baseOf(current) });
    setTakeTheirs(new Set());
    send(chosen, theirs, current);
  };
  const choose = (keys: (keyof Draft)[]) => (choice: FieldChoice) =>
    setTakeTheirs((prev) => {
      const next = new Set(prev);
      for (const k of keys) {
        if (choice === 'theirs') next.add(k);
        else next.delete(k);
      }
      return next;
    });
  const fields: ConflictField[] = [];
  for (const k of clashes) {
    if (k === 'lon') continue;
    const keys: (keyof Draft)[] = k === 'lat' ? ['lat', 'lon'] : [k];
    fields.push({
      key: k === 'lat' ? 'position' : k,
      label: k === 'lat' ? 'Position' : draftLabels[k],
      theirs: keys.map((x) => shown(theirs[x])).join(', '),
      mine: keys.map((x) => shown(value[x])).join(', '),
      choice: takeTheirs.has(k) ? 'theirs' : 'mine',
      onChoose: choose(keys),
    });
  }

  return (
    <View style={formStyles.form} testID="observation-editor">
      {draft.wasRestored && !asking ? (
        <View style={[formStyles.notice, { backgroundColor: colors.surfaceAlt }]}>
          <Text variant="caption" style={formStyles.flex}>
            Your unsaved changes were restored.
          </Text>
          <Button label="Discard changes" tone="ghost" compact onPress={draft.clear} />
        </View>
      ) : null}
      {asking ? (
        <RecordConflict
          what="edit"
          testID="edit-conflict"
          theirVersion={current.version}
          baseVersion={baseVersion}
          changedBy={latest ? { name: latest.editedByName, at: latest.editedAt } : null}
          busy={save.isPending}
          onKeepMine={resolve}
          onTakeTheirs={() => {
            draft.clear();
            onDone();
          }}
          fields={fields}
        />
      ) : null}
      <ObservationFields
        campaignId={current.campaignId}
        diveId={current.diveId}
        editing={current}
        value={value}
        update={(patch) => {
          update(patch);
          setErrors((shown) => errorsAfterChange(shown, Object.keys(patch) as (keyof Draft)[], { ...value, ...patch }));
        }}
        errors={errors}
        onSubmit={() => send(value, base, current)}
      />
      {save.error instanceof ApiError && save.error.issues.length === 0 && save.error.code !== 'stale_version' ? (
        <Text color={colors.danger} role="alert" testID="form-error">
          {save.error.message}
        </Text>
      ) : null}
      {asking ? null : (
        <View style={formStyles.actions}>
          <Button label="Save changes" testID="save-observation" busy={save.isPending} onPress={() => send(value, base, current)} />
          <Button
            label="Cancel"
            tone="ghost"
            testID="cancel-edit"
            onPress={() => {
              draft.clear();
              onDone();
            }}
          />
        </View>
      )}
    </View>
  );
}

/** A field of the form as the conflict panel shows it: tags joined, empty as empty. */
const shown = (v: string | readonly string[] | undefined) => (v === undefined ? '' : typeof v === 'string' ? v : v.join(', '));
