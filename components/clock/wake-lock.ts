/**
 * Keeps the screen on while a heat is timed: the browser's Screen Wake Lock API behind a tiny
 * hook. The browser releases the lock when the page is hidden; it is asked for again when the
 * page shows again, and given back when timing ends. Where the API is missing (an older browser,
 * a native build without it) the hook says so, and the screen tells the coach to keep it awake.
 *
 * (expo-keep-awake arrives only as a dependency of expo itself, not of this project; the browser
 * API does the job on the web target without adding one.)
 */
import { useEffect, useState } from 'react';

type Sentinel = { release: () => Promise<void>; addEventListener?: (type: 'release', fn: () => void) => void };
type WakeLockApi = { request: (type: 'screen') => Promise<Sentinel> };

export type WakeState = 'off' | 'on' | 'unsupported' | 'refused';

function api(): WakeLockApi | null {
  if (typeof navigator === 'undefined') return null;
  return (navigator as unknown as { wakeLock?: WakeLockApi }).wakeLock ?? null;
}

/** Holds a screen wake lock while `active` is true. */
export function useWakeLock(active: boolean): WakeState {
  const [state, setState] = useState<WakeState>(() => (api() ? 'off' : 'unsupported'));

  useEffect(() => {
    const lockApi = api();
    if (!active || !lockApi) {
      setState(lockApi ? 'off' : 'unsupported');
      return;
    }
    let sentinel: Sentinel | null = null;
    let alive = true;
    const acquire = async () => {
      if (sentinel || (typeof document !== 'undefined' && document.visibilityState !== 'visible')) return;
      try {
        const got = await lockApi.request('screen');
        if (!alive) {
          void got.release().catch(() => undefined);
          return;
        }
        sentinel = got;
        got.addEventListener?.('release', () => {
          if (sentinel === got) sentinel = null;
          if (alive) setState('off');
        });
        setState('on');
      } catch {
        // Refused (battery saver, no user gesture yet, permissions policy): the screen says so.
        if (alive) setState('refused');
      }
    };
    const onVisible = () => {
      if (document.visibilityState === 'visible') void acquire();
    };
    void acquire();
    document.addEventListener('visibilitychange', onVisible);
    return () => {
      alive = false;
      document.removeEventListener('visibilitychange', onVisible);
      const held = sentinel;
      sentinel = null;
      if (held) void held.release().catch(() => undefined);
    };
  }, [active]);

  return state;
}
