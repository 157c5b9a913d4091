import type { Point } from '@/lib/laser-scale';

/** A measurement being marked on a photo, in the photo's original pixels. */
export type MeasureDraft = {
  kind: 'length' | 'area';
  laser: Point[];
  points: Point[];
  /** The point the arrow keys move: a laser dot or a measurement point. */
  selected: { list: 'laser' | 'points'; index: number } | null;
  /** Where Enter places the next point. */
  cursor: Point;
};

/** Where a photo shown whole ("contain") sits in a box, and how much it is scaled. */
export function containedRect(box: { width: number; height: number }, image: { width: number; height: number }) {
  const scale = Math.min(box.width / image.width, box.height / image.height);
  return {
    scale,
    left: (box.width - image.width * scale) / 2,
    top: (box.height - image.height * scale) / 2,
  };
}

/** A point on the screen (relative to the box) as a point of the original photo; null off the photo. */
export function toOriginal(
  at: { x: number; y: number },
  box: { width: number; height: number },
  image: { width: number; height: number },
): Point | null {
  const r = containedRect(box, image);
  if (!(r.scale > 0)) return null;
  const x = (at.x - r.left) / r.scale;
  const y = (at.y - r.top) / r.scale;
  if (x < 0 || y < 0 || x > image.width || y > image.height) return null;
  // Tenths of a pixel are finer than any hand places a point; they keep the numbers short.
  return [Math.round(x * 10) / 10, Math.round(y * 10) / 10];
}

export type DraftAction =
  | { type: 'place'; at: Point }
  | { type: 'placeAtCursor' }
  | { type: 'nudge'; dx: number; dy: number }
  | { type: 'selectNext'; backwards: boolean }
  | { type: 'deselect' }
  | { type: 'undo' }
  | { type: 'clear' }
  /** After saving: the same laser dots, new points. */
  | { type: 'again' }
  | { type: 'kind'; kind: MeasureDraft['kind'] };

export const emptyDraft = (width: number, height: number): MeasureDraft => ({
  kind: 'length',
  laser: [],
  points: [],
  selected: null,
  cursor: [Math.round(width / 2), Math.round(height / 2)],
});

const clamp = (v: number, max: number) => Math.min(max, Math.max(0, v));

/** Every placed point in order: the two laser dots first, then the measurement's points. */
export function placedPoints(d: MeasureDraft): { list: 'laser' | 'points'; index: number }[] {
  return [
    ...d.laser.map((_, index) => ({ list: 'laser' as const, index })),
    ...d.points.map((_, index) => ({ list: 'points' as const, index })),
  ];
}

/** Whether Tab (or Shift+Tab) has another placed point to go to before leaving the photo. */
export function hasNext(d: MeasureDraft, backwards: boolean): boolean {
  const all = placedPoints(d);
  if (all.length === 0) return false;
  if (!d.selected) return true;
  const at = all.findIndex((s) => s.list === d.selected!.list && s.index === d.selected!.index);
  return backwards ? at > 0 : at < all.length - 1;
}

/** The laser dots are marked first; every later point belongs to the measurement. */
function place(d: MeasureDraft, at: Point): MeasureDraft {
  if (d.laser.length < 2) return { ...d, laser: [...d.laser, at], selected: { list: 'laser', index: d.laser.length }, cursor: at };
  return { ...d, points: [...d.points, at], selected: { list: 'points', index: d.points.length }, cursor: at };
}

export function draftReducer(image: { width: number; height: number }) {
  return (d: MeasureDraft, a: DraftAction): MeasureDraft => {
    switch (a.type) {
      case 'place':
        return place(d, [clamp(a.at[0], image.width), clamp(a.at[1], image.height)]);
      case 'placeAtCursor':
        return place(d, d.cursor);
      case 'nudge': {
        const from = d.selected ? d[d.selected.list][d.selected.index] : d.cursor;
        if (!from) return d;
        const to: Point = [clamp(from[0] + a.dx, image.width), clamp(from[1] + a.dy, image.height)];
        if (!d.selected) return { ...d, cursor: to };
        const list = d[d.selected.list].map((p, i) => (i === d.selected!.index ? to : p));
        return { ...d, [d.selected.list]: list, cursor: to };
      }
      case 'selectNext': {
        const all = placedPoints(d);
        if (all.length === 0) return d;
        const at = d.selected ? all.findIndex((s) => s.list === d.selected!.list && s.index === d.selected!.index) : -1;
        const next = a.backwards ? (at <= 0 ? all.length - 1 : at - 1) : (at + 1) % all.length;
        const sel = all[next]!;
        return { ...d, selected: sel, cursor: d[sel.list][sel.index]! };
      }
      case 'deselect':
        return { ...d, selected: null };
      case 'undo':
        if (d.points.length > 0) return { ...d, points: d.points.slice(0, -1), selected: null };
        return { ...d, laser: d.laser.slice(0, -1), selected: null };
      case 'clear':
        return { ...emptyDraft(image.width, image.height), kind: d.kind };
      case 'again':
        return { ...d, points: [], selected: null };
      case 'kind':
        return { ...d, kind: a.kind };
    }
  };
}
