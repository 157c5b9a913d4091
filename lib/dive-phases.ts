import type { Dive, DivePhase } from './schemas';

/** The dive's four phases in order: the API's name, the dive's field, and the label people read. */
export const phaseSteps: readonly { phase: DivePhase; key: keyof Dive['phases']; label: string }[] = [
  { phase: 'launch', key: 'launch', label: 'Launch' },
  { phase: 'on-bottom', key: 'onBottom', label: 'On bottom' },
  { phase: 'off-bottom', key: 'offBottom', label: 'Off bottom' },
  { phase: 'on-deck', key: 'onDeck', label: 'On deck' },
];

export const phaseLabels: [keyof Dive['phases'], string][] = phaseSteps.map((s) => [s.key, s.label]);
