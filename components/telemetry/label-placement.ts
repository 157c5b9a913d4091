/**
 * Where to put a plot's labels so that none covers another, a marker or the plot's furniture
 * (north arrow, scale bar): each label tries a few spots around its anchor in turn and takes the
 * first that is free and inside the frame; a label with no free spot is left out (its marker still
 * names it to a screen reader and on hover).
 */
export type Box = { x: number; y: number; width: number; height: number };

export const overlaps = (a: Box, b: Box) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

const inside = (a: Box, frame: Box) =>
  a.x >= frame.x && a.y >= frame.y && a.x + a.width <= frame.x + frame.width && a.y + a.height <= frame.y + frame.height;

/** Width of a caption label (12 px type), generous so that the box holds the rendered text. */
export const labelWidth = (text: string) => Math.ceil(text.length * 7.2) + 6;
export const LABEL_HEIGHT = 16;

export type LabelRequest = { key: string; text: string; x: number; y: number; clearance?: number };
export type PlacedLabel = LabelRequest & { box: Box };

/** Places labels in order (most important first) around their anchors, avoiding `obstacles` and each other. */
export function placeLabels(labels: readonly LabelRequest[], obstacles: readonly Box[], frame: Box): PlacedLabel[] {
  const taken: Box[] = [...obstacles];
  const placed: PlacedLabel[] = [];
  for (const l of labels) {
    const w = labelWidth(l.text);
    const h = LABEL_HEIGHT;
    const c = l.clearance ?? 8;
    const spots: Box[] = [
      { x: l.x + c, y: l.y - h - 2, width: w, height: h },
      { x: l.x + c, y: l.y + 2, width: w, height: h },
      { x: l.x - c - w, y: l.y - h - 2, width: w, height: h },
      { x: l.x - c - w, y: l.y + 2, width: w, height: h },
      { x: l.x - w / 2, y: l.y - c - h, width: w, height: h },
      { x: l.x - w / 2, y: l.y + c, width: w, height: h },
    ];
    const spot = spots.find((s) => inside(s, frame) && !taken.some((t) => overlaps(s, t)));
    if (!spot) continue;
    taken.push(spot);
    placed.push({ ...l, box: spot });
  }
  return placed;
}

/** The corner of the frame (inset by `pad`) where a box of the given size covers the fewest points. */
export function emptiestCorner(
  frame: Box,
  size: { width: number; height: number },
  points: readonly { x: number; y: number }[],
  pad: number,
  avoid: readonly Box[] = [],
): Box {
  const corners: Box[] = [
    { x: frame.x + frame.width - size.width - pad, y: frame.y + pad, ...size },
    { x: frame.x + pad, y: frame.y + pad, ...size },
    { x: frame.x + frame.width - size.width - pad, y: frame.y + frame.height - size.height - pad, ...size },
    { x: frame.x + pad, y: frame.y + frame.height - size.height - pad, ...size },
  ];
  const cost = (b: Box) =>
    points.filter((p) => p.x >= b.x - 6 && p.x <= b.x + b.width + 6 && p.y >= b.y - 6 && p.y <= b.y + b.height + 6).length +
    (avoid.some((a) => overlaps(a, b)) ? 1e6 : 0);
  return corners.reduce((best, b) => (cost(b) < cost(best) ? b : best));
}
