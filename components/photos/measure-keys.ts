export type MeasureKeyHandlers = {
  onNudge: (dx: number, dy: number) => void;
  onPlace: () => void;
  /** Selects the next (or previous) placed point; false when there is none to go to. */
  onSelectNext: (backwards: boolean) => boolean;
  onDeselect: () => void;
  /** + zooms in, - zooms out (by this factor). */
  onZoom: (factor: number) => void;
};

/** Devices measure by touch; the web build also listens to the keyboard. */
export function useMeasureKeys(_handlers: MeasureKeyHandlers, _active: boolean) {}

/** The photo's measuring surface, which takes keyboard focus while measuring. */
export const measureStageTestId = 'measure-stage';
