import { useWindowDimensions } from 'react-native';

import { breakpoints } from '@/lib/tokens';

export type Breakpoint = 'phone' | 'tablet' | 'wide';

export function useBreakpoint(): Breakpoint {
  const { width } = useWindowDimensions();
  if (width >= breakpoints.wide) return 'wide';
  if (width >= breakpoints.tablet) return 'tablet';
  return 'phone';
}

/**
 * The one place that decides how the app is laid out at each size: navigation at the bottom on
 * phones and at the side from tablets up; list and detail side by side on wide screens; a note's
 * preview beside its field wherever two columns fit, behind an Edit / Preview switch on phones.
 */
export function useLayout() {
  const breakpoint = useBreakpoint();
  return {
    breakpoint,
    navPlacement: breakpoint === 'phone' ? ('bottom' as const) : ('side' as const),
    splitView: breakpoint === 'wide',
    previewBeside: breakpoint !== 'phone',
  };
}
