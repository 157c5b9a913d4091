import { useState, type Dispatch } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useDive } from '@/hooks/dives';
import { useCreateMeasurement, useLastSpacing } from '@/hooks/measurements';
import { formatMeasurement, measure, MeasureError, type MeasureResult, type Point } from '@/lib/laser-scale';
import { palettes, space } from '@/lib/tokens';
import type { DraftAction, MeasureDraft } from './measure-draft';

const dark = palettes.dark;

type Props = {
  photo: { id: string; width: number; height: number };
  observation: { id: string; diveId: string };
  draft: MeasureDraft;
  /** How far the most coarsely placed point may be off, in the photo's pixels (finer for points placed zoomed in). */
  placementPx: number;
  dispatch: Dispatch<DraftAction>;
  onDone: () => void;
};

const kindLabel = { length: 'Length', area: 'Area' } as const;

function stepHint(d: MeasureDraft): string {
  if (d.laser.length === 0) return 'Mark the first laser dot.';
  if (d.laser.length === 1) return 'Mark the second laser dot.';
  if (d.kind === 'length') return d.points.length < 2 ? 'Mark the two ends of the length.' : 'Add points along a curved body, or save.';
  return d.points.length < 3 ? 'Mark the corners of the area (3 or more).' : 'Add corners, or save.';
}

const pair = (p: Point): [number, number] => [p[0], p[1]];

/** Reading a typed spacing: a comma may stand for the decimal point. */
const parseSpacing = (text: string) => Number(text.replace(',', '.'));

/** The measuring tools under the photo: kind, laser spacing, the live value, save. */
export function MeasurePanel({ photo, observation, draft, placementPx, dispatch, onDone }: Props) {
  const [lastSpacing, setLastSpacing] = useLastSpacing();
  const diveSpacing = useDive(observation.diveId).data?.laserSpacingCm ?? null;
  // The dive's spacing when it has one, else the last one this person used; typed, it holds for this photo.
  const [typedSpacing, setSpacingText] = useState<string | null>(null);
  const spacingText = typedSpacing ?? String(diveSpacing ?? lastSpacing);
  const [savedText, setSavedText] = useState<string | null>(null);
  const create = useCreateMeasurement(observation);
  const spacingCm = parseSpacing(spacingText);
  const spacingOk = spacingCm > 0 && spacingCm <= 1000;

  let result: MeasureResult | null = null;
  let problem: string | null = null;
  const enough = draft.laser.length === 2 && draft.points.length >= (draft.kind === 'area' ? 3 : 2);
  if (enough && spacingOk) {
    try {
      result = measure({
        spacingCm,
        laser: [draft.laser[0]!, draft.laser[1]!],
        kind: draft.kind,
        points: draft.points,
        placementPx,
        image: { width: photo.width, height: photo.height },
      });
    } catch (err) {
      problem = err instanceof MeasureError ? err.message : 'These points cannot be measured.';
    }
  }

  const save = () => {
    if (!result) return;
    setSavedText(null);
    create.mutate(
      {
        photoId: photo.id,
        spacingCm,
        laser: [pair(draft.laser[0]!), pair(draft.laser[1]!)],
        kind: draft.kind,
        points: draft.points.map(pair),
        placementPx,
      },
      {
        onSuccess: (m) => {
          setLastSpacing(spacingCm);
          setSavedText(`Saved: ${kindLabel[m.kind]} ${formatMeasurement(m)}`);
          dispatch({ type: 'again' });
        },
      },
    );
  };

  return (
    <View style={styles.panel} testID="measure-panel">
      <Text variant="caption" color={dark.warning} testID="measure-warning" style={styles.wrap}>
        The result holds only for an object in the plane of the two laser dots, roughly square to the camera. Lens distortion near the edge
        of the frame adds error.
      </Text>
      <Text color={dark.text} testID="measure-hint" style={styles.wrap}>
        {stepHint(draft)}
      </Text>
      <View style={styles.row}>
        <Segmented
          label="Measure"
          hideLabel
          options={[
            { value: 'length', label: 'Length' },
            { value: 'area', label: 'Area' },
          ]}
          value={draft.kind}
          onChange={(kind) => dispatch({ type: 'kind', kind })}
          testID="measure-kind"
        />
        <View style={styles.spacing}>
          {/* The viewer is dark whatever the theme, so the label is drawn here in the viewer's colours. */}
          <Text variant="label" color={dark.text}>
            Laser spacing (cm)
          </Text>
          <Field
            label="Laser spacing (cm)"
            hideLabel
            value={spacingText}
            onChangeText={setSpacingText}
            keyboardType="decimal-pad"
            inputMode="decimal"
            error={spacingOk ? undefined : 'A spacing above 0 cm'}
            testID="measure-spacing"
            mono
          />
          <Text variant="caption" color={dark.textMuted} testID="measure-spacing-source">
            {typedSpacing !== null ? 'For this measurement' : diveSpacing !== null ? 'Set for this dive' : 'Your last spacing'}
          </Text>
        </View>
      </View>
      {result ? (
        <View>
          <Text variant="title" color={dark.text} testID="measure-result">
            {kindLabel[draft.kind]} {formatMeasurement(result)}
          </Text>
          <Text variant="caption" color={dark.textMuted} testID="measure-basis" style={styles.wrap}>
            {`Each point taken as placed to ±${placementPx} px of the photo (zoom in and place or drag points for finer); ${result.scaleCmPerPx.toPrecision(3)} cm per pixel.`}
          </Text>
        </View>
      ) : null}
      {problem ? (
        <Text color={dark.danger} testID="measure-problem" style={styles.wrap}>
          {problem}
        </Text>
      ) : null}
      {create.error ? (
        <Text color={dark.danger} testID="measure-save-error" style={styles.wrap}>
          {create.error.message}
        </Text>
      ) : null}
      {savedText ? (
        <Text color={dark.success} testID="measure-saved">
          {savedText}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Save" compact disabled={!result} busy={create.isPending} onPress={save} testID="measure-save" />
        <Button label="Undo point" tone="secondary" compact onPress={() => dispatch({ type: 'undo' })} testID="measure-undo" />
        <Button label="Start again" tone="secondary" compact onPress={() => dispatch({ type: 'clear' })} testID="measure-clear" />
        <Button label="Done" tone="ghost" compact onPress={onDone} testID="measure-done" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { gap: space.sm, padding: space.md },
  wrap: { flexShrink: 1 },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', gap: space.sm },
  spacing: { width: 160, gap: space.xs },
});
