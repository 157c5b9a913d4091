import { defaultPlacementPx, type Point } from '@/lib/laser-scale';

/** A measurement being marked on a photo, in the photo's original pixels. */
export type MeasureDraft = {
  kind: 'length' | 'area';
  laser: Point[];
  points: Point[];
  /** The point the arrow keys move: a laser dot or a measurement point. */
  selected: { list: 'laser' | 'points'; index: number } | null;
  /** Where Enter places the next point. */
  cursor: Point;
  /** How finely each point was placed (or last moved), in the photo's pixels: finer when zoomed in. */
  laserPx: number[];
  pointsPx: number[];
};

type Box = { width: number; height: number };
type Size = { width: number; height: number };

/** How far the photo is zoomed (1 shows it whole) and the photo point at the middle of the view. */
export type ZoomView = { zoom: number; cx: number; cy: number };

export const minZoom = 1;
export const maxZoom = 8;
/** Placed points are never taken to be finer than this, however far the photo is zoomed. */
export const finestPlacementPx = 0.25;

export const fitView = (image: Size): ZoomView => ({ zoom: 1, cx: image.width / 2, cy: image.height / 2 });

/** Where a photo shown whole ("contain") sits in a box, and how much it is scaled. */
export function containedRect(box: { width: number; height: number }, image: { width: number; height: number }) {
  const scale = Math.min(box.width / image.width, box.height / image.height);
  return {
    scale,
    left: (box.width - image.width * scale) / 2,
    top: (box.height - image.height * scale) / 2,
  };
}

/**
 * Where the photo sits in the box at a zoom: scaled by the zoom beyond "contain", centred on the
 * view's middle point, but never leaving a gap at an edge the photo could cover.
 */
export function viewRect(box: Box, image: Size, view?: ZoomView) {
  const fit = containedRect(box, image);
  if (!view || view.zoom <= 1) return fit;
  const scale = fit.scale * view.zoom;
  const axis = (boxLen: number, imageLen: number, centre: number) => {
    const len = imageLen * scale;
    if (len <= boxLen) return (boxLen - len) / 2;
    return Math.min(0, Math.max(boxLen - len, boxLen / 2 - centre * scale));
  };
  return { scale, left: axis(box.width, image.width, view.cx), top: axis(box.height, image.height, view.cy) };
}

/** The view as it is really shown: its middle point moved back where an edge stopped it. */
function settle(box: Box, image: Size, view: ZoomView): ZoomView {
  const zoom = Math.min(maxZoom, Math.max(minZoom, view.zoom));
  const r = viewRect(box, image, { ...view, zoom });
  if (!(r.scale > 0)) return { ...view, zoom };
  return { zoom, cx: (box.width / 2 - r.left) / r.scale, cy: (box.height / 2 - r.top) / r.scale };
}

/** Zooms by a factor keeping the photo point under `at` (a point of the box) where it is. */
export function zoomAt(box: Box, image: Size, view: ZoomView, factor: number, at?: { x: number; y: number }): ZoomView {
  const r = viewRect(box, image, view);
  const fit = containedRect(box, image).scale;
  if (!(r.scale > 0)) return view;
  const zoom = Math.min(maxZoom, Math.max(minZoom, view.zoom * factor));
  const focus = at ?? { x: box.width / 2, y: box.height / 2 };
  const px = (focus.x - r.left) / r.scale;
  const py = (focus.y - r.top) / r.scale;
  const scale = fit * zoom;
  return settle(box, image, { zoom, cx: px + (box.width / 2 - focus.x) / scale, cy: py + (box.height / 2 - focus.y) / scale });
}

/** Moves the zoomed photo by a drag of (dx, dy) screen pixels. */
export function panBy(box: Box, image: Size, view: ZoomView, dx: number, dy: number): ZoomView {
  const r = viewRect(box, image, view);
  if (!(r.scale > 0)) return view;
  return settle(box, image, { ...view, cx: view.cx - dx / r.scale, cy: view.cy - dy / r.scale });
}

/**
 * How far a point placed by hand may be off, in the photo's pixels: 2 px, or one screen pixel when
 * the photo is shown smaller than that, divided by the zoom, and never under a quarter pixel.
 */
export function placementAt(box: Box, image: Size, view?: ZoomView): number {
  const fit = containedRect(box, image).scale;
  if (!(fit > 0)) return defaultPlacementPx;
  const whole = Math.max(defaultPlacementPx, 1 / fit);
  return Math.max(finestPlacementPx, Math.ceil((100 * whole) / (view?.zoom ?? 1)) / 100);
}

/** The placement the whole measurement is sent with: its most coarsely placed point. */
export const draftPlacementPx = (d: MeasureDraft): number => Math.max(finestPlacementPx, ...d.laserPx, ...d.pointsPx);

/** A point on the screen (relative to the box) as a point of the original photo; null off the photo. */
export function toOriginal(at: { x: number; y: number }, box: Box, image: Size, view?: ZoomView): Point | null {
  const r = viewRect(box, image, view);
  if (!(r.scale > 0)) return null;
  const x = (at.x - r.left) / r.scale;
  const y = (at.y - r.top) / r.scale;
  if (x < 0 || y < 0 || x > image.width || y > image.height) return null;
  // Tenths of a pixel are finer than any hand places a point; they keep the numbers short.
  return [Math.round(x * 10) / 10, Math.round(y * 10) / 10];
}

export type PointRef = { list: 'laser' | 'points'; index: number };

/** `px`: how finely the point is placed, in the photo's pixels (2 when not said). */
export type DraftAction =
  | { type: 'place'; at: Point; px?: number }
  | { type: 'placeAtCursor'; px?: number }
  | { type: 'nudge'; dx: number; dy: number; px?: number }
  /** A point dragged to a new place. */
  | { type: 'move'; target: PointRef; to: Point; px?: number }
  | { type: 'select'; target: PointRef }
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
  laserPx: [],
  pointsPx: [],
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
function place(d: MeasureDraft, at: Point, px: number): MeasureDraft {
  if (d.laser.length < 2) {
    return { ...d, laser: [...d.laser, at], laserPx: [...d.laserPx, px], selected: { list: 'laser', index: d.laser.length }, cursor: at };
  }
  return {
    ...d,
    points: [...d.points, at],
    pointsPx: [...d.pointsPx, px],
    selected: { list: 'points', index: d.points.length },
    cursor: at,
  };
}

/** One point put somewhere else, placed as finely as `px`; it becomes the selected one. */
function moveTo(d: MeasureDraft, target: PointRef, to: Point, px: number): MeasureDraft {
  const pxKey = target.list === 'laser' ? 'laserPx' : 'pointsPx';
  if (!d[target.list][target.index]) return d;
  return {
    ...d,
    [target.list]: d[target.list].map((p, i) => (i === target.index ? to : p)),
    [pxKey]: d[pxKey].map((p, i) => (i === target.index ? px : p)),
    selected: target,
    cursor: to,
  };
}

export function draftReducer(image: { width: number; height: number }) {
  return (d: MeasureDraft, a: DraftAction): MeasureDraft => {
    switch (a.type) {
      case 'place':
        return place(d, [clamp(a.at[0], image.width), clamp(a.at[1], image.height)], a.px ?? defaultPlacementPx);
      case 'placeAtCursor':
        return place(d, d.cursor, a.px ?? defaultPlacementPx);
      case 'nudge': {
        const from = d.selected ? d[d.selected.list][d.selected.index] : d.cursor;
        if (!from) return d;
        const to: Point = [clamp(from[0] + a.dx, image.width), clamp(from[1] + a.dy, image.height)];
        if (!d.selected) return { ...d, cursor: to };
        return moveTo(d, d.selected, to, a.px ?? defaultPlacementPx);
      }
      case 'move':
        return moveTo(d, a.target, [clamp(a.to[0], image.width), clamp(a.to[1], image.height)], a.px ?? defaultPlacementPx);
      case 'select': {
        const at = d[a.target.list][a.target.index];
        return at ? { ...d, selected: a.target, cursor: at } : d;
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
        if (d.points.length > 0) return { ...d, points: d.points.slice(0, -1), pointsPx: d.pointsPx.slice(0, -1), selected: null };
        return { ...d, laser: d.laser.slice(0, -1), laserPx: d.laserPx.slice(0, -1), selected: null };
      case 'clear':
        return { ...emptyDraft(image.width, image.height), kind: d.kind };
      case 'again':
        return { ...d, points: [], pointsPx: [], selected: null };
      case 'kind':
        return { ...d, kind: a.kind };
    }
  };
}
