import { describe, expect, it } from 'vitest';

import {
  containedRect,
  draftPlacementPx,
  draftReducer,
  emptyDraft,
  fitView,
  hasNext,
  panBy,
  placementAt,
  toOriginal,
  viewRect,
  zoomAt,
  type DraftAction,
  type MeasureDraft,
} from '@/components/photos/measure-draft';

// Worked here by hand: a 1600 × 1000 photo shown whole in a box, and the points marked on it.
const image = { width: 1600, height: 1000 };

describe('screen to photo pixels', () => {
  it('fits a wide photo to the box’s width and centres it vertically', () => {
    const r = containedRect({ width: 400, height: 500 }, image);
    expect(r.scale).toBe(0.25); // worked here: min(400/1600, 500/1000)
    expect(r.left).toBe(0);
    expect(r.top).toBe(125); // worked here: (500 − 1000 · 0.25) / 2
  });

  it('fits a photo to the box’s height and centres it horizontally', () => {
    const r = containedRect({ width: 1000, height: 500 }, image);
    expect(r.scale).toBe(0.5); // worked here: min(1000/1600, 500/1000)
    expect(r.left).toBe(100); // worked here: (1000 − 1600 · 0.5) / 2
    expect(r.top).toBe(0);
  });

  it('maps a tap back to the original pixel, and a tap on the bars beside the photo to nothing', () => {
    const box = { width: 1000, height: 500 };
    expect(toOriginal({ x: 100, y: 0 }, box, image)).toEqual([0, 0]);
    expect(toOriginal({ x: 350, y: 150 }, box, image)).toEqual([500, 300]); // worked here: (350 − 100)/0.5, 150/0.5
    expect(toOriginal({ x: 900, y: 500 }, box, image)).toEqual([1600, 1000]);
    expect(toOriginal({ x: 99, y: 250 }, box, image)).toBeNull();
    expect(toOriginal({ x: 901, y: 250 }, box, image)).toBeNull();
  });
});

describe('marking a measurement', () => {
  const reduce = draftReducer(image);
  const run = (d: MeasureDraft, ...actions: Parameters<typeof reduce>[1][]) => actions.reduce(reduce, d);

  it('takes the laser dots first, then the measurement’s points', () => {
    const d = run(
      emptyDraft(image.width, image.height),
      { type: 'place', at: [500, 300] },
      { type: 'place', at: [900, 300] },
      { type: 'place', at: [300, 700] },
    );
    expect(d.laser).toEqual([
      [500, 300],
      [900, 300],
    ]);
    expect(d.points).toEqual([[300, 700]]);
    expect(d.selected).toEqual({ list: 'points', index: 0 });
  });

  it('moves the selected point one pixel per arrow, and never off the photo', () => {
    let d = run(emptyDraft(image.width, image.height), { type: 'place', at: [1599, 10] });
    d = run(d, { type: 'nudge', dx: 1, dy: 0 }, { type: 'nudge', dx: 1, dy: 0 }, { type: 'nudge', dx: 0, dy: -1 });
    expect(d.laser[0]).toEqual([1600, 9]);
  });

  it('places at the cursor with Enter and moves the cursor when nothing is selected', () => {
    let d = emptyDraft(image.width, image.height);
    expect(d.cursor).toEqual([800, 500]);
    d = run(d, { type: 'nudge', dx: -10, dy: 0 }, { type: 'placeAtCursor' });
    expect(d.laser).toEqual([[790, 500]]);
  });

  it('goes through the placed points with Tab and lets go after the last', () => {
    let d = run(emptyDraft(image.width, image.height), { type: 'place', at: [1, 1] }, { type: 'place', at: [20, 1] });
    expect(hasNext(d, false)).toBe(false); // the second dot, the last placed, is selected
    expect(hasNext(d, true)).toBe(true);
    d = run(d, { type: 'selectNext', backwards: true });
    expect(d.selected).toEqual({ list: 'laser', index: 0 });
    expect(d.cursor).toEqual([1, 1]);
  });

  it('undoes the measurement’s points before the dots, and starts again with the same dots', () => {
    let d = run(
      emptyDraft(image.width, image.height),
      { type: 'place', at: [1, 1] },
      { type: 'place', at: [20, 1] },
      { type: 'place', at: [5, 5] },
      { type: 'place', at: [9, 9] },
    );
    d = run(d, { type: 'undo' });
    expect(d.points).toEqual([[5, 5]]);
    d = run(d, { type: 'again' });
    expect(d.points).toEqual([]);
    expect(d.laser).toHaveLength(2);
    d = run(d, { type: 'clear' });
    expect(d.laser).toEqual([]);
  });
});

describe('zooming for finer placement', () => {
  const box = { width: 1000, height: 500 }; // the photo shown whole at 0.5
  const reduce = draftReducer(image);

  it('zooms about the middle, keeps the photo point under a tap where it was, and never pans past an edge', () => {
    const two = zoomAt(box, image, fitView(image), 2);
    expect(viewRect(box, image, two)).toEqual({ scale: 1, left: -300, top: -250 }); // worked here: 500 − 800 · 1, 250 − 500 · 1
    expect(toOriginal({ x: 500, y: 250 }, box, image, two)).toEqual([800, 500]);
    // About the photo point (400, 200), shown at (300, 100) when whole: it stays at (300, 100).
    const about = zoomAt(box, image, fitView(image), 2, { x: 300, y: 100 });
    expect(toOriginal({ x: 300, y: 100 }, box, image, about)).toEqual([400, 200]);
    // Dragged far right, the photo's left edge stops at the box's left edge.
    expect(viewRect(box, image, panBy(box, image, two, 5000, 0)).left).toBe(0);
    expect(zoomAt(box, image, two, 100).zoom).toBe(8);
    expect(zoomAt(box, image, two, 0.01)).toEqual(fitView(image));
  });

  it('takes points placed zoomed in as placed finer, and a measurement as its most coarsely placed point', () => {
    expect(placementAt(box, image)).toBe(2); // one screen pixel is 2 px of the photo: the 2 px floor
    expect(placementAt({ width: 400, height: 500 }, image)).toBe(4); // worked here: one screen pixel at 0.25 is 4 px
    expect(placementAt(box, image, { zoom: 4, cx: 800, cy: 500 })).toBe(0.5); // worked here: 2 ÷ 4
    expect(placementAt(box, image, { zoom: 8, cx: 800, cy: 500 })).toBe(0.25);
    const placed: DraftAction[] = [
      { type: 'place', at: [1, 1], px: 2 },
      { type: 'place', at: [20, 1], px: 0.5 },
      { type: 'place', at: [5, 5], px: 0.5 },
    ];
    let d = placed.reduce(reduce, emptyDraft(image.width, image.height));
    expect(draftPlacementPx(d)).toBe(2);
    // The first dot dragged while zoomed in: now every point is placed to 0.5 px.
    d = reduce(d, { type: 'move', target: { list: 'laser', index: 0 }, to: [2, 1], px: 0.5 });
    expect(d.laser[0]).toEqual([2, 1]);
    expect(d.selected).toEqual({ list: 'laser', index: 0 });
    expect(draftPlacementPx(d)).toBe(0.5);
    d = reduce(d, { type: 'nudge', dx: 1, dy: 0, px: 1 });
    expect(d.laser[0]).toEqual([3, 1]);
    expect(draftPlacementPx(d)).toBe(1);
  });
});
