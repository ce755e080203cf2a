/**
 * A callback whose identity never changes but which always runs the latest `fn` given: memoised
 * children can take it as a prop without re-rendering whenever the parent makes a new closure.
 * Only for event handlers (called after render), never for values read during render.
 */
import { useCallback, useRef } from 'react';

export function useLatestCallback<A extends unknown[], R>(fn: (...args: A) => R): (...args: A) => R {
  const ref = useRef(fn);
  ref.current = fn;
  return useCallback((...args: A) => ref.current(...args), []);
}
