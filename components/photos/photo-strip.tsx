import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { photoUrl, useRetirePhoto, useTakeTimeFromPhoto, useUpdatePhoto } from '@/hooks/photos';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { ObservationDetail, Photo } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { PhotoImage } from './photo-image';

type Props = { observation: ObservationDetail; canEdit: boolean; onOpen: (index: number) => void };

/** An entry's photos in their order, each opening the viewer; its author and the lead may edit them. */
export function PhotoStrip({ observation, canEdit, onOpen }: Props) {
  const photos = observation.photos;
  return (
    <View style={styles.list} testID="photo-strip">
      {photos.map((photo, i) => (
        <PhotoRow
          key={photo.id}
          photo={photo}
          observation={observation}
          canEdit={canEdit}
          first={i === 0}
          last={i === photos.length - 1}
          onOpen={() => onOpen(i)}
        />
      ))}
    </View>
  );
}

function messageOf(err: unknown): string {
  if (err instanceof ApiError && err.status === 409) return 'Someone changed this entry meanwhile. It has been reloaded; try again.';
  return err instanceof Error ? err.message : 'That did not work.';
}

type RowProps = { photo: Photo; observation: ObservationDetail; canEdit: boolean; first: boolean; last: boolean; onOpen: () => void };

function PhotoRow({ photo, observation, canEdit, first, last, onOpen }: RowProps) {
  const { colors } = useTheme();
  const [editing, setEditing] = useState(false);
  const [confirmRemove, setConfirmRemove] = useState(false);
  const update = useUpdatePhoto(observation);
  const retire = useRetirePhoto(observation);
  const takeTime = useTakeTimeFromPhoto(observation);
  const error = update.error ?? retire.error ?? takeTime.error;
  const timeDiffers = photo.capturedAt !== null && photo.capturedAt !== observation.observedAt;
  const label = photo.caption ?? `Photo ${photo.position + 1} of ${observation.title}`;

  return (
    <View style={[styles.row, { borderColor: colors.border, backgroundColor: colors.surface }]} testID={`photo-${photo.id}`}>
      <Pressable
        onPress={onOpen}
        accessibilityRole="button"
        accessibilityLabel={`Open ${label}`}
        style={[styles.thumb, { backgroundColor: colors.surfaceAlt }]}
        testID="photo-thumb"
      >
        <PhotoImage uri={photoUrl(photo, 'thumb')} label={label} />
      </Pressable>
      <View style={styles.body}>
        {editing ? (
          <CaptionEditor
            photo={photo}
            busy={update.isPending}
            onCancel={() => setEditing(false)}
            onSave={(caption, credit) => update.mutate({ id: photo.id, caption, credit }, { onSuccess: () => setEditing(false) })}
          />
        ) : (
          <>
            <Text testID="photo-caption" muted={!photo.caption}>
              {photo.caption ?? 'No caption'}
            </Text>
            <Text variant="caption" muted>
              {[
                photo.credit ? `© ${photo.credit}` : null,
                photo.capturedAt ? `Taken ${formatUtc(photo.capturedAt)}` : 'No capture time in the file',
              ]
                .filter(Boolean)
                .join(' · ')}
            </Text>
          </>
        )}
        {canEdit && !editing ? (
          <View style={styles.actions}>
            <Button label="Edit" tone="ghost" compact onPress={() => setEditing(true)} testID="photo-edit" />
            <Button
              label="Earlier"
              tone="ghost"
              compact
              disabled={first || update.isPending}
              onPress={() => update.mutate({ id: photo.id, position: Math.max(0, photo.position - 1) })}
              testID="photo-earlier"
            />
            <Button
              label="Later"
              tone="ghost"
              compact
              disabled={last || update.isPending}
              onPress={() => update.mutate({ id: photo.id, position: photo.position + 1 })}
              testID="photo-later"
            />
            {timeDiffers ? (
              <Button
                label="Use this photo's time"
                tone="ghost"
                compact
                busy={takeTime.isPending}
                onPress={() => takeTime.mutate(photo.capturedAt!)}
                testID="photo-use-time"
              />
            ) : null}
            <Button
              label={confirmRemove ? 'Remove it' : 'Remove'}
              tone={confirmRemove ? 'danger' : 'ghost'}
              compact
              busy={retire.isPending}
              onPress={() => (confirmRemove ? retire.mutate(photo.id) : setConfirmRemove(true))}
              testID="photo-remove"
            />
            {confirmRemove ? (
              <Button label="Keep" tone="ghost" compact onPress={() => setConfirmRemove(false)} testID="photo-keep" />
            ) : null}
          </View>
        ) : null}
        {error ? (
          <Text variant="caption" color={colors.danger} role="alert">
            {messageOf(error)}
          </Text>
        ) : null}
      </View>
    </View>
  );
}

function CaptionEditor({
  photo,
  busy,
  onSave,
  onCancel,
}: {
  photo: Photo;
  busy: boolean;
  onSave: (caption: string, credit: string) => void;
  onCancel: () => void;
}) {
  const [caption, setCaption] = useState(photo.caption ?? '');
  const [credit, setCredit] = useState(photo.credit ?? '');
  return (
    <View style={styles.editor}>
      <Field label="Caption" value={caption} onChangeText={setCaption} maxLength={500} testID="photo-caption-field" />
      <Field label="Credit" value={credit} onChangeText={setCredit} maxLength={200} testID="photo-credit-field" />
      <View style={styles.actions}>
        <Button label="Save" compact busy={busy} onPress={() => onSave(caption, credit)} testID="photo-save" />
        <Button label="Cancel" tone="ghost" compact onPress={onCancel} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  row: { flexDirection: 'row', gap: space.md, borderWidth: 1, borderRadius: radius.md, padding: space.sm, alignItems: 'flex-start' },
  thumb: { width: 96, height: 72, borderRadius: radius.sm, overflow: 'hidden', position: 'relative' },
  body: { flex: 1, gap: 4 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  editor: { gap: space.sm },
});
