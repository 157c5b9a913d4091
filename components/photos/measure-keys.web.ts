import { useEffect, useRef } from 'react';

import type { MeasureKeyHandlers } from './measure-keys';

export type { MeasureKeyHandlers };

/** The photo's measuring surface, which takes keyboard focus while measuring. */
export const measureStageTestId = 'measure-stage';

const steps: Record<string, [number, number]> = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, -1], ArrowDown: [0, 1] };

/**
 * While the measuring surface has focus: arrow keys move the selected point (or the cursor) by one
 * pixel of the original photo, ten with Shift; Enter places a point at the cursor; Tab goes through
 * the placed points and then on to the buttons; Esc lets go of the selected point; + and - zoom.
 */
export function useMeasureKeys(handlers: MeasureKeyHandlers, active: boolean) {
  const latest = useRef(handlers);
  useEffect(() => {
    latest.current = handlers;
  });
  useEffect(() => {
    if (!active) return;
    const onKey = (e: KeyboardEvent) => {
      const target = e.target as HTMLElement | null;
      if (target?.getAttribute('data-testid') !== measureStageTestId) return;
      const step = steps[e.key];
      if (step) {
        const by = e.shiftKey ? 10 : 1;
        latest.current.onNudge(step[0] * by, step[1] * by);
      } else if (e.key === 'Enter' || e.key === ' ') latest.current.onPlace();
      else if (e.key === 'Escape') latest.current.onDeselect();
      else if (e.key === '+' || e.key === '=') latest.current.onZoom(2);
      else if (e.key === '-' || e.key === '_') latest.current.onZoom(0.5);
      else if (e.key === 'Tab') {
        if (!latest.current.onSelectNext(e.shiftKey)) return;
      } else return;
      e.preventDefault();
      e.stopPropagation();
    };
    window.addEventListener('keydown', onKey, true);
    return () => window.removeEventListener('keydown', onKey, true);
  }, [active]);
}
