import { useState } from 'react';
import { View } from 'react-native';

import { Button } from '@/components/ui/button';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useDraft } from '@/hooks/draft';
import { useFollowDive } from '@/hooks/live';
import { useObservation, useUpdateObservation } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import type { ObservationDetail } from '@/lib/schemas';
import { changes, differing, draftFromObservation, draftLabels, type Draft, type FormErrors } from './entry-draft';
import { RecordConflict } from './record-conflict';
import { errorsFromServer, formStyles, ObservationFields } from './observation-form';

type EditDraft = Draft & { baseVersion: number };

export function ObservationEditor({ id, onDone }: { id: string; onDone: () => void }) {
  const observation = useObservation(id);
  useFollowDive(observation.data?.diveId);
  if (observation.isPending) return <LoadingState label="Loading the entry…" />;
  if (observation.isError) return <ErrorState error={observation.error} onRetry={() => void observation.refetch()} />;
  return <Editor key={observation.data.id} current={observation.data} refetch={() => observation.refetch()} onDone={onDone} />;
}

/**
 * Editing keeps the version it started from. If someone else saved in between, the server
 * refuses with 409 and this shows both versions, field by field, to choose from: nothing is
 * overwritten without the editor seeing what they would overwrite.
 */
function Editor({ current, refetch, onDone }: { current: ObservationDetail; refetch: () => Promise<unknown>; onDone: () => void }) {
  const { colors } = useTheme();
  const draft = useDraft<EditDraft>(`bathynote.edit.${current.id}`, () => ({
    ...draftFromObservation(current),
    baseVersion: current.version,
  }));
  const [errors, setErrors] = useState<FormErrors>({});
  const save = useUpdateObservation(current.id);
  const { baseVersion, ...value } = draft.value;

  const submit = (version = baseVersion, base: ObservationDetail = current) => {
    const body = changes(value, base, version);
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
        // A stale version: fetching the entry again brings the other person's version into view.
        if (err instanceof ApiError && err.code === 'stale_version') void refetch();
        else setErrors(errorsFromServer(err));
      },
    });
  };

  // The cached entry moves on when someone else saves (seen live or on a refused save).
  const theirs = current.version !== baseVersion ? current : null;
  const mine = value;
  const theirDraft = theirs ? draftFromObservation(theirs) : null;
  const clashes = theirDraft ? differing(mine, theirDraft) : [];

  return (
    <View style={formStyles.form} testID="observation-editor">
      {draft.wasRestored && !theirs ? (
        <View style={[formStyles.notice, { backgroundColor: colors.surfaceAlt }]}>
          <Text variant="caption" style={formStyles.flex}>
            Your unsaved changes were restored.
          </Text>
          <Button label="Discard changes" tone="ghost" compact onPress={draft.clear} />
        </View>
      ) : null}
      {theirs && theirDraft ? (
        <RecordConflict
          what="edit"
          testID="edit-conflict"
          theirVersion={theirs.version}
          baseVersion={baseVersion}
          busy={save.isPending}
          onKeepMine={() => submit(theirs.version, theirs)}
          onTakeTheirs={() => {
            draft.clear();
            onDone();
          }}
          fields={clashes.map((k) => ({ key: k, label: draftLabels[k], theirs: shown(theirDraft[k]), mine: shown(mine[k]) }))}
        />
      ) : null}
      <ObservationFields
        campaignId={current.campaignId}
        diveId={current.diveId}
        value={value}
        update={draft.update}
        errors={errors}
        onSubmit={() => submit()}
      />
      {save.error instanceof ApiError && save.error.issues.length === 0 && save.error.code !== 'stale_version' ? (
        <Text color={colors.danger} role="alert" testID="form-error">
          {save.error.message}
        </Text>
      ) : null}
      {theirs ? null : <Button label="Save changes" testID="save-observation" busy={save.isPending} onPress={() => submit()} />}
    </View>
  );
}

/** A field of the form as the conflict panel shows it: tags joined, empty as empty. */
const shown = (v: string | readonly string[] | undefined) => (v === undefined ? '' : typeof v === 'string' ? v : v.join(', '));
