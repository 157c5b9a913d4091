/**
 * Types for `smpte-timecode` 1.3.6, which ships none. Only the parts used as a
 * reference in tests are declared.
 */
declare module 'smpte-timecode' {
  interface Timecode {
    frameCount: number;
    hours: number;
    minutes: number;
    seconds: number;
    frames: number;
    dropFrame: boolean;
    frameRate: number;
    toString(format?: 'field'): string;
    valueOf(): number;
  }

  interface TimecodeConstructor {
    new (timeCode?: number | string | Date, frameRate?: number | [number, number], dropFrame?: boolean): Timecode;
    (timeCode?: number | string | Date, frameRate?: number | [number, number], dropFrame?: boolean): Timecode;
  }

  const Timecode: TimecodeConstructor;
  export = Timecode;
}
