/**
 * useOnce: a guard for buttons whose work goes to the server. While one run is on its way, another
 * press does nothing, so a gloved double tap sends once (before the screen has re-rendered to
 * show the button busy). `busy` is the same state for the screen.
 */
import { useCallback, useRef, useState } from 'react';

export function useOnce() {
  const inFlight = useRef(false);
  const [busy, setBusy] = useState(false);
  const run = useCallback(async (work: () => Promise<unknown>) => {
    if (inFlight.current) return;
    inFlight.current = true;
    setBusy(true);
    try {
      await work();
    } finally {
      inFlight.current = false;
      setBusy(false);
    }
  }, []);
  return { run, busy };
}
