import { useEffect, useRef, type RefObject } from 'react';
import type { View } from 'react-native';

import type { PointRef } from './measure-draft';
import type { StageGestureHandlers, XY } from './measure-gestures';

export type { StageGestureHandlers, XY };

/** A press that moves less than this (screen pixels) is a tap; a finger wobbles more than a mouse. */
const tapSlop = { mouse: 4, touch: 10 };
/** How near a point a press must land to take hold of it. */
const grabRadius = { mouse: 12, touch: 22 };

type Held =
  | { mode: 'tap' | 'pan'; start: XY; last: XY }
  | { mode: 'point'; target: PointRef; start: XY; moved: boolean }
  | { mode: 'pinch'; distance: number; mid: XY };

/**
 * Mouse, pen and touch on the measuring surface, through pointer events: a tap places a point, a
 * press on a point drags it, a drag elsewhere moves the zoomed photo, two fingers pinch to zoom,
 * and the mouse wheel zooms about the pointer.
 */
export function useStageGestures(ref: RefObject<View | null>, handlers: StageGestureHandlers, active: boolean): boolean {
  const latest = useRef(handlers);
  useEffect(() => {
    latest.current = handlers;
  });
  useEffect(() => {
    const el = ref.current as unknown as HTMLElement | null;
    if (!active || !el) return;
    // The browser must not scroll or zoom the page under a finger on the photo.
    el.style.touchAction = 'none';
    const down = new Map<number, XY>();
    let held: Held | null = null;
    const local = (e: PointerEvent | WheelEvent): XY => {
      const r = el.getBoundingClientRect();
      return { x: e.clientX - r.left, y: e.clientY - r.top };
    };
    const kind = (e: PointerEvent) => (e.pointerType === 'touch' ? 'touch' : 'mouse');
    const pinchOf = (): Held => {
      const [a, b] = [...down.values()] as [XY, XY];
      return { mode: 'pinch', distance: Math.hypot(b.x - a.x, b.y - a.y), mid: { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 } };
    };

    const onDown = (e: PointerEvent) => {
      if (e.button !== 0 && e.pointerType === 'mouse') return;
      const at = local(e);
      down.set(e.pointerId, at);
      el.setPointerCapture?.(e.pointerId);
      // The default (which would focus the surface) is held back below, so the keys are given focus here.
      el.focus({ preventScroll: true });
      if (down.size === 2) held = pinchOf();
      else if (down.size === 1) {
        const target = latest.current.pick(at, grabRadius[kind(e)]);
        if (target) {
          latest.current.onGrab(target);
          held = { mode: 'point', target, start: at, moved: false };
        } else held = { mode: 'tap', start: at, last: at };
      }
      e.preventDefault();
    };
    const onMove = (e: PointerEvent) => {
      if (!down.has(e.pointerId) || !held) return;
      const at = local(e);
      down.set(e.pointerId, at);
      if (held.mode === 'pinch') {
        if (down.size < 2) return;
        const next = pinchOf() as Extract<Held, { mode: 'pinch' }>;
        if (held.distance > 0 && next.distance > 0) latest.current.onZoom(next.distance / held.distance, next.mid);
        latest.current.onPan(next.mid.x - held.mid.x, next.mid.y - held.mid.y);
        held = next;
      } else if (held.mode === 'point') {
        const dx = at.x - held.start.x;
        const dy = at.y - held.start.y;
        if (!held.moved && Math.hypot(dx, dy) < tapSlop[kind(e)]) return;
        held.moved = true;
        latest.current.onDrag(held.target, dx, dy);
      } else {
        if (held.mode === 'tap' && Math.hypot(at.x - held.start.x, at.y - held.start.y) < tapSlop[kind(e)]) return;
        latest.current.onPan(at.x - held.last.x, at.y - held.last.y);
        held = { mode: 'pan', start: held.start, last: at };
      }
    };
    const onUp = (e: PointerEvent) => {
      if (!down.has(e.pointerId)) return;
      down.delete(e.pointerId);
      if (held?.mode === 'tap' && e.type === 'pointerup') latest.current.onTap(held.start);
      // After a pinch the finger left on the glass goes on as a pan, never as a tap.
      if (held?.mode === 'pinch' && down.size === 1) {
        const last = [...down.values()][0]!;
        held = { mode: 'pan', start: last, last };
      } else if (down.size === 0) held = null;
    };
    const onWheel = (e: WheelEvent) => {
      e.preventDefault();
      const lines = e.deltaMode === 1 ? 16 : e.deltaMode === 2 ? 400 : 1;
      latest.current.onZoom(Math.exp((-e.deltaY * lines) / 400), local(e));
    };

    el.addEventListener('pointerdown', onDown);
    el.addEventListener('pointermove', onMove);
    el.addEventListener('pointerup', onUp);
    el.addEventListener('pointercancel', onUp);
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => {
      el.removeEventListener('pointerdown', onDown);
      el.removeEventListener('pointermove', onMove);
      el.removeEventListener('pointerup', onUp);
      el.removeEventListener('pointercancel', onUp);
      el.removeEventListener('wheel', onWheel);
    };
  }, [ref, active]);
  return true;
}
