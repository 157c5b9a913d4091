import { describe, expect, it } from 'vitest';

import { containedRect, draftReducer, emptyDraft, hasNext, toOriginal, type MeasureDraft } from '@/components/photos/measure-draft';

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
