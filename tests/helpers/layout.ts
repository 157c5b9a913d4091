/** Measuring a rendered page for the layout tests: boxes that overlap, and text that runs off screen. */
import type { Page } from 'playwright-core';

export type Box = { x: number; y: number; width: number; height: number };

/** Whether two boxes share more than half a pixel each way. */
export const overlaps = (a: Box, b: Box) =>
  a.x < b.x + b.width - 0.5 && b.x < a.x + a.width - 0.5 && a.y < b.y + b.height - 0.5 && b.y < a.y + a.height - 0.5;

/** Every piece of visible text that reaches past the window's left or right edge (nothing should). */
export function textPastEdges(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const out: string[] = [];
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      if (!n.textContent?.trim()) continue;
      const range = document.createRange();
      range.selectNodeContents(n);
      for (const r of Array.from(range.getClientRects())) {
        if (r.width === 0 || r.height === 0) continue;
        if (r.left < -0.5 || r.right > width + 0.5)
          out.push(`${n.textContent.trim().slice(0, 40)} (${Math.round(r.left)}–${Math.round(r.right)})`);
      }
    }
    return out;
  });
}
