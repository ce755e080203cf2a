/**
 * One breakpoint for the whole app: 'phone' under 1024 px, 'wide' from 1024 px. Below that a
 * coach holds a phone at the boards; above it a laptop in the evening gets a designed
 * side-by-side layout (not a stretched phone).
 */
import { useWindowDimensions } from 'react-native';

import { layout } from './theme';

export type Breakpoint = 'phone' | 'wide';

export function breakpointFor(width: number): Breakpoint {
  return width >= layout.wideFrom ? 'wide' : 'phone';
}

export function useBreakpoint(): Breakpoint {
  // useWindowDimensions re-renders on resize and orientation changes, so a laptop window that is
  // narrowed falls back to the phone layout live.
  const { width } = useWindowDimensions();
  return breakpointFor(width);
}
