import type { RefObject } from 'react';
import type { View } from 'react-native';

import type { PointRef } from './measure-draft';

export type XY = { x: number; y: number };

export type StageGestureHandlers = {
  /** The placed point under a spot of the surface, within `radius` screen pixels, if any. */
  pick: (at: XY, radius: number) => PointRef | null;
  /** A tap or click that did not move, away from any point: a new point there. */
  onTap: (at: XY) => void;
  /** A point taken hold of (a tap on it selects it). */
  onGrab: (target: PointRef) => void;
  /** The held point dragged by (dx, dy) screen pixels since it was taken hold of. */
  onDrag: (target: PointRef, dx: number, dy: number) => void;
  /** The photo dragged by (dx, dy) screen pixels since the last call. */
  onPan: (dx: number, dy: number) => void;
  /** Zoom by a factor about a spot of the surface. */
  onZoom: (factor: number, at: XY) => void;
};

/** Devices take taps through the responder (see MeasureLayer); the web build reads pointer events. False: not handled here. */
export function useStageGestures(_ref: RefObject<View | null>, _handlers: StageGestureHandlers, _active: boolean): boolean {
  return false;
}
