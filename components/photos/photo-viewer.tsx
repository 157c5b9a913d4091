import { useReducer, useRef, useState } from 'react';
import { Linking, Modal, ScrollView, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { usePhotoMeasurements } from '@/hooks/measurements';
import { photoUrl, useThumbnailsOnly } from '@/hooks/photos';
import { formatUtc } from '@/lib/format';
import type { Photo } from '@/lib/schemas';
import { palettes, space } from '@/lib/tokens';
import {
  draftPlacementPx,
  draftReducer,
  emptyDraft,
  fitView,
  hasNext,
  maxZoom,
  minZoom,
  panBy,
  placementAt,
  viewRect,
  zoomAt,
  type PointRef,
  type ZoomView,
} from './measure-draft';
import { useMeasureKeys } from './measure-keys';
import { MeasureLayer } from './measure-layer';
import { MeasurePanel } from './measure-panel';
import { PhotoImage } from './photo-image';
import { useViewerKeys } from './viewer-keys';

export type ViewerPhoto = Pick<Photo, 'id' | 'urls' | 'caption' | 'credit' | 'capturedAt' | 'width' | 'height'> & {
  /** The entry the photo belongs to, shown under it in a gallery. */
  entryTitle?: string;
};

type Props = {
  photos: ViewerPhoto[];
  index: number | null;
  onIndexChange: (index: number) => void;
  onClose: () => void;
  /** How many there are in all, when more are still to load. */
  total?: number;
  /** Called on stepping past the last loaded photo. */
  onNeedMore?: () => void;
  /** The entry the photos belong to, when the caller may measure on them with the laser scale. */
  measureFor?: { id: string; diveId: string };
};

// The viewer is always dark, whatever the theme: photos read best on black.
const dark = palettes.dark;

/** One photo at a time on a dark ground, stepping with buttons, or ← → and Esc on a keyboard. */
export function PhotoViewer({ photos, index, onIndexChange, onClose, total, onNeedMore, measureFor }: Props) {
  const [measuring, setMeasuring] = useState(false);
  const current = index === null ? undefined : photos[index];
  const open = current !== undefined;
  const count = Math.max(total ?? 0, photos.length);
  const step = (by: number) => {
    if (index === null) return;
    const next = index + by;
    if (next < 0) return;
    if (next >= photos.length) {
      onNeedMore?.();
      return;
    }
    setMeasuring(false);
    onIndexChange(next);
  };
  const close = () => {
    setMeasuring(false);
    onClose();
  };
  // While measuring, the arrow keys and Esc belong to the points being placed.
  useViewerKeys({ onPrevious: () => step(-1), onNext: () => step(1), onClose: close }, open && !measuring);

  return (
    <Modal visible={open} transparent animationType="none" onRequestClose={close}>
      {current && index !== null ? (
        <ViewerBody
          photo={current}
          position={index + 1}
          count={count}
          onStep={step}
          onClose={close}
          measureFor={measureFor}
          measuring={measuring}
          onMeasuring={setMeasuring}
        />
      ) : null}
    </Modal>
  );
}

function ViewerBody({
  photo,
  position,
  count,
  onStep,
  onClose,
  measureFor,
  measuring,
  onMeasuring,
}: {
  photo: ViewerPhoto;
  position: number;
  count: number;
  onStep: (by: number) => void;
  onClose: () => void;
  measureFor: { id: string; diveId: string } | undefined;
  measuring: boolean;
  onMeasuring: (on: boolean) => void;
}) {
  const { breakpoint } = useLayout();
  const [thumbnailsOnly, setThumbnailsOnly] = useThumbnailsOnly();
  const [asked, setAsked] = useState<ReadonlySet<string>>(new Set());
  const showFull = !thumbnailsOnly || asked.has(photo.id);
  const label = photo.caption ?? photo.entryTitle ?? 'Photo';
  const image = { width: photo.width, height: photo.height };
  const [box, setBox] = useState({ width: 0, height: 0 });
  const [showMeasurements, setShowMeasurements] = useState(true);
  const saved = usePhotoMeasurements(photo.id).data?.items ?? [];
  const [draft, dispatch] = useReducer(draftReducer(image), image, ({ width, height }) => emptyDraft(width, height));
  // Zoom belongs to measuring: the photo is shown whole otherwise.
  const [zoomView, setZoomView] = useState<ZoomView>(() => fitView(image));
  const view = measuring ? zoomView : undefined;
  const rect = viewRect(box, image, view);
  // A point placed (or moved) now is placed this finely, in the photo's pixels.
  const px = placementAt(box, image, view);
  const zoomBy = (factor: number, at?: { x: number; y: number }) => setZoomView((v) => zoomAt(box, image, v, factor, at));
  // A point moved by the keys past the edge of a zoomed view brings the view along.
  const keepInView = (p: readonly [number, number]) => {
    if (!view || !(rect.scale > 0)) return;
    const margin = 24;
    const shift = (at: number, len: number) => (at < margin ? margin - at : at > len - margin ? len - margin - at : 0);
    const dx = shift(rect.left + p[0] * rect.scale, box.width);
    const dy = shift(rect.top + p[1] * rect.scale, box.height);
    if (dx !== 0 || dy !== 0) setZoomView((v) => panBy(box, image, v, dx, dy));
  };
  // Where a dragged point was when it was taken hold of.
  const grabbed = useRef<{ target: PointRef; from: readonly [number, number] } | null>(null);
  useMeasureKeys(
    {
      onNudge: (dx, dy) => {
        dispatch({ type: 'nudge', dx, dy, px });
        const from = draft.selected ? draft[draft.selected.list][draft.selected.index] : draft.cursor;
        if (from) keepInView([from[0] + dx, from[1] + dy]);
      },
      onPlace: () => dispatch({ type: 'placeAtCursor', px }),
      // The keys zoom about the point being worked on.
      onZoom: (factor) => zoomBy(factor, { x: rect.left + draft.cursor[0] * rect.scale, y: rect.top + draft.cursor[1] * rect.scale }),
      onSelectNext: (backwards) => {
        if (!hasNext(draft, backwards)) {
          dispatch({ type: 'deselect' });
          return false;
        }
        dispatch({ type: 'selectNext', backwards });
        return true;
      },
      onDeselect: () => dispatch({ type: 'deselect' }),
    },
    measuring,
  );
  const startMeasuring = () => {
    dispatch({ type: 'clear' });
    setZoomView(fitView(image));
    onMeasuring(true);
  };
  // The photo's images sit where the zoom puts them; whole ("contain") before the stage is laid out.
  const placed =
    rect.scale > 0
      ? {
          position: 'absolute' as const,
          left: rect.left,
          top: rect.top,
          width: image.width * rect.scale,
          height: image.height * rect.scale,
        }
      : StyleSheet.absoluteFill;

  return (
    <View style={styles.backdrop} testID="photo-viewer" role="dialog" aria-modal aria-label="Photo viewer">
      <View style={styles.bar}>
        <Text variant="mono" color={dark.text} testID="viewer-counter">
          {position} / {count}
        </Text>
        <View style={styles.flex} />
        {saved.length > 0 ? (
          <Chip
            label="Measurements"
            selected={showMeasurements}
            onPress={() => setShowMeasurements(!showMeasurements)}
            testID="viewer-show-measurements"
          />
        ) : null}
        <Chip
          label="Thumbnails only"
          selected={thumbnailsOnly}
          onPress={() => setThumbnailsOnly(!thumbnailsOnly)}
          testID="viewer-thumbnails-only"
        />
        {measureFor && !measuring ? (
          <Button label="Measure" tone="secondary" compact onPress={startMeasuring} testID="viewer-measure" />
        ) : null}
        <Button label="Close" tone="secondary" compact onPress={onClose} testID="viewer-close" />
      </View>

      <View style={styles.stage} onLayout={(e) => setBox({ width: e.nativeEvent.layout.width, height: e.nativeEvent.layout.height })}>
        <View style={placed} pointerEvents="none">
          <PhotoImage key={`${photo.id}-thumb`} uri={photoUrl(photo, 'thumb')} label={label} fit="contain" testID="viewer-thumb" />
        </View>
        {showFull ? (
          <View style={placed} pointerEvents="none">
            <PhotoImage key={`${photo.id}-display`} uri={photoUrl(photo, 'display')} label={label} fit="contain" testID="viewer-display" />
          </View>
        ) : (
          <View style={styles.loadFull}>
            <Button
              label="Load full image"
              tone="secondary"
              onPress={() => setAsked(new Set(asked).add(photo.id))}
              testID="viewer-load-full"
            />
          </View>
        )}
        <MeasureLayer
          image={image}
          box={box}
          draft={measuring ? draft : null}
          saved={saved}
          showSaved={showMeasurements}
          view={view}
          onPlace={(at) => dispatch({ type: 'place', at, px })}
          gestures={{
            onGrab: (target) => {
              const from = draft[target.list][target.index];
              grabbed.current = from ? { target, from } : null;
              dispatch({ type: 'select', target });
            },
            onDrag: (target, dx, dy) => {
              const g = grabbed.current;
              if (!g || g.target.list !== target.list || g.target.index !== target.index || !(rect.scale > 0)) return;
              // Tenths of a pixel, as a placed point.
              const to = [
                Math.round((g.from[0] + dx / rect.scale) * 10) / 10,
                Math.round((g.from[1] + dy / rect.scale) * 10) / 10,
              ] as const;
              dispatch({ type: 'move', target, to, px });
            },
            onPan: (dx, dy) => setZoomView((v) => panBy(box, image, v, dx, dy)),
            onZoom: zoomBy,
          }}
        />
        {measuring ? (
          <View style={styles.zoom}>
            <Button
              label="−"
              aria-label="Zoom out"
              tone="secondary"
              compact
              disabled={zoomView.zoom <= minZoom}
              onPress={() => zoomBy(0.5)}
              testID="measure-zoom-out"
            />
            <Text variant="mono" color={dark.text} testID="measure-zoom">
              {`${Number(zoomView.zoom.toFixed(1))}×`}
            </Text>
            <Button
              label="+"
              aria-label="Zoom in"
              tone="secondary"
              compact
              disabled={zoomView.zoom >= maxZoom}
              onPress={() => zoomBy(2)}
              testID="measure-zoom-in"
            />
          </View>
        ) : null}
      </View>

      {measuring && measureFor ? (
        <ScrollView style={styles.measure}>
          <MeasurePanel
            photo={photo}
            observation={measureFor}
            draft={draft}
            placementPx={draftPlacementPx(draft)}
            dispatch={dispatch}
            onDone={() => onMeasuring(false)}
          />
        </ScrollView>
      ) : (
        <View style={[styles.footer, breakpoint === 'phone' && styles.footerPhone]}>
          <View style={styles.caption}>
            {photo.entryTitle ? (
              <Text variant="label" color={dark.text} testID="viewer-entry">
                {photo.entryTitle}
              </Text>
            ) : null}
            {photo.caption ? (
              <Text color={dark.text} testID="viewer-caption" style={styles.wrapText}>
                {photo.caption}
              </Text>
            ) : null}
            <Text variant="caption" color={dark.textMuted}>
              {[
                photo.capturedAt ? `Taken ${formatUtc(photo.capturedAt)}` : null,
                photo.credit ? `© ${photo.credit}` : null,
                `${photo.width} × ${photo.height} px`,
              ]
                .filter(Boolean)
                .join(' · ')}
            </Text>
          </View>
          <View style={styles.steps}>
            <Button
              label="‹ Previous"
              tone="secondary"
              compact
              disabled={position <= 1}
              onPress={() => onStep(-1)}
              testID="viewer-previous"
            />
            <Button label="Next ›" tone="secondary" compact disabled={position >= count} onPress={() => onStep(1)} testID="viewer-next" />
            <Button
              label="Original"
              tone="ghost"
              compact
              onPress={() => void Linking.openURL(photoUrl(photo, 'original'))}
              testID="viewer-original"
            />
          </View>
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, backgroundColor: dark.bg },
  bar: { flexDirection: 'row', alignItems: 'center', gap: space.md, padding: space.md, flexWrap: 'wrap' },
  flex: { flex: 1 },
  measure: { flexGrow: 0, maxHeight: '50%' },
  stage: { flex: 1, margin: space.md, position: 'relative', overflow: 'hidden' },
  zoom: {
    position: 'absolute',
    top: space.sm,
    right: space.sm,
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.xs,
    padding: space.xs,
    borderRadius: 8,
    backgroundColor: 'rgba(0,0,0,0.55)',
  },
  wrapText: { flexShrink: 1 },
  loadFull: { ...StyleSheet.absoluteFill, alignItems: 'center', justifyContent: 'flex-end', paddingBottom: space.xl },
  footer: { flexDirection: 'row', alignItems: 'center', gap: space.lg, padding: space.md, flexWrap: 'wrap' },
  footerPhone: { flexDirection: 'column', alignItems: 'stretch' },
  // The caption takes what the buttons leave and wraps; the buttons never shrink or get cut off.
  caption: { flexGrow: 1, flexShrink: 1, flexBasis: 240, gap: 2, minWidth: 0 },
  steps: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, justifyContent: 'flex-end', flexShrink: 0, maxWidth: '100%' },
});
