import { useRef } from 'react';
import { StyleSheet, View, type GestureResponderEvent } from 'react-native';
import Svg, { Circle, Line, Polygon, Polyline } from 'react-native-svg';

import type { Point } from '@/lib/laser-scale';
import type { Measurement } from '@/lib/schemas';
import { placedPoints, toOriginal, viewRect, type MeasureDraft, type ZoomView } from './measure-draft';
import { useStageGestures, type StageGestureHandlers } from './measure-gestures';
import { measureStageTestId } from './measure-keys';

const laserColour = '#ff4d4d';
const drawColour = '#ffd166';
const savedColour = '#7ae7ea';
const selectedColour = '#ffffff';

type Props = {
  image: { width: number; height: number };
  box: { width: number; height: number };
  draft: MeasureDraft | null;
  saved: Measurement[];
  showSaved: boolean;
  /** The zoom the photo is shown at (whole when left out). */
  view?: ZoomView;
  onPlace: (at: Point) => void;
  /** Drag, pan and zoom on the surface; without them it only places points. */
  gestures?: Omit<StageGestureHandlers, 'onTap' | 'pick'>;
};

const pts = (points: readonly Point[]) => points.map((p) => `${p[0]},${p[1]}`).join(' ');

/**
 * Drawn over the photo in the photo's own pixels (the drawing is scaled exactly as the image is),
 * and, while measuring, the surface that takes taps, clicks and the keyboard.
 */
export function MeasureLayer({ image, box, draft, saved, showSaved, view, onPlace, gestures }: Props) {
  const stage = useRef<View>(null);
  const { scale, left, top } = viewRect(box, image, view);
  const handled = useStageGestures(
    stage,
    {
      pick: (at, radius) => {
        if (!draft || !(scale > 0)) return null;
        // The nearest placed point within reach, measured on the screen.
        let best: { ref: ReturnType<typeof placedPoints>[number]; d: number } | null = null;
        for (const ref of placedPoints(draft)) {
          const p = draft[ref.list][ref.index]!;
          const d = Math.hypot(left + p[0] * scale - at.x, top + p[1] * scale - at.y);
          if (d <= radius && (!best || d < best.d)) best = { ref, d };
        }
        return best?.ref ?? null;
      },
      onTap: (at) => {
        const p = toOriginal(at, box, image, view);
        if (p) onPlace(p);
      },
      onGrab: (t) => gestures?.onGrab(t),
      onDrag: (t, dx, dy) => gestures?.onDrag(t, dx, dy),
      onPan: (dx, dy) => gestures?.onPan(dx, dy),
      onZoom: (f, at) => gestures?.onZoom(f, at),
    },
    !!draft,
  );
  if (!(scale > 0)) return null;
  // Marks keep the same size on screen whatever the photo's scale.
  const px = 1 / scale;
  const onRelease = (e: GestureResponderEvent) => {
    const at = toOriginal({ x: e.nativeEvent.locationX, y: e.nativeEvent.locationY }, box, image, view);
    if (at) onPlace(at);
  };
  const isSelected = (list: 'laser' | 'points', index: number) => draft?.selected?.list === list && draft.selected.index === index;

  return (
    <>
      <Svg
        style={{ position: 'absolute', left, top, width: image.width * scale, height: image.height * scale }}
        width={image.width * scale}
        height={image.height * scale}
        viewBox={`0 0 ${image.width} ${image.height}`}
        preserveAspectRatio="xMidYMid meet"
        pointerEvents="none"
        testID="measure-drawing"
      >
        {showSaved
          ? saved.map((m) =>
              m.kind === 'area' ? (
                <Polygon key={m.id} points={pts(m.points)} stroke={savedColour} strokeWidth={2 * px} fill="rgba(122,231,234,0.15)" />
              ) : (
                <Polyline key={m.id} points={pts(m.points)} stroke={savedColour} strokeWidth={2 * px} fill="none" />
              ),
            )
          : null}
        {draft ? (
          <>
            {draft.laser.length === 2 ? (
              <Line
                x1={draft.laser[0]![0]}
                y1={draft.laser[0]![1]}
                x2={draft.laser[1]![0]}
                y2={draft.laser[1]![1]}
                stroke={laserColour}
                strokeWidth={1.5 * px}
                strokeDasharray={`${6 * px} ${4 * px}`}
              />
            ) : null}
            {draft.points.length > 1 ? (
              draft.kind === 'area' ? (
                <Polygon points={pts(draft.points)} stroke={drawColour} strokeWidth={2 * px} fill="rgba(255,209,102,0.2)" />
              ) : (
                <Polyline points={pts(draft.points)} stroke={drawColour} strokeWidth={2 * px} fill="none" />
              )
            ) : null}
            {draft.laser.map((p, i) => (
              <Circle
                key={`laser-${i}`}
                cx={p[0]}
                cy={p[1]}
                r={7 * px}
                stroke={isSelected('laser', i) ? selectedColour : laserColour}
                strokeWidth={2 * px}
                fill="none"
              />
            ))}
            {draft.points.map((p, i) => (
              <Circle
                key={`point-${i}`}
                cx={p[0]}
                cy={p[1]}
                r={5 * px}
                stroke={isSelected('points', i) ? selectedColour : drawColour}
                strokeWidth={2 * px}
                fill="none"
              />
            ))}
            {draft.selected ? null : (
              <>
                <Line
                  x1={draft.cursor[0] - 9 * px}
                  y1={draft.cursor[1]}
                  x2={draft.cursor[0] + 9 * px}
                  y2={draft.cursor[1]}
                  stroke={selectedColour}
                  strokeWidth={px}
                />
                <Line
                  x1={draft.cursor[0]}
                  y1={draft.cursor[1] - 9 * px}
                  x2={draft.cursor[0]}
                  y2={draft.cursor[1] + 9 * px}
                  stroke={selectedColour}
                  strokeWidth={px}
                />
              </>
            )}
          </>
        ) : null}
      </Svg>
      {draft ? (
        <View
          ref={stage}
          style={StyleSheet.absoluteFill}
          testID={measureStageTestId}
          focusable
          accessible
          aria-label="Photo to measure on: tap or click to place a point, drag a point to move it, drag elsewhere to move a zoomed photo; with the keyboard, Enter places a point, the arrow keys move it by one pixel, + and - zoom"
          {...(handled ? {} : { onStartShouldSetResponder: () => true, onResponderRelease: onRelease })}
        />
      ) : null}
    </>
  );
}
