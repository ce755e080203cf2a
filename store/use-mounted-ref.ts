/** A ref that is true while the component is mounted: a write that settles late must not set state after unmount. */
import { useEffect, useRef } from 'react';

export function useMountedRef() {
  const mounted = useRef(true);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);
  return mounted;
}
