/**
 * Is the Boardside server reachable right now? The browser's online flag alone lies (rink Wi-Fi
 * with no internet behind it), so the answer also rests on a light health check, repeated while
 * the app is open. The board shows the result; nothing waits on it.
 * A sign-out made while the server was out of reach is sent from here once it can be reached
 * again (`watchPendingSignOut`), whatever screen is showing.
 */
import { useEffect } from 'react';
import { create } from 'zustand';
import { API_BASE_URL, sendPendingSignOut } from './api';
import { pendingSignOut } from './pending-sign-out';

type Connectivity = { online: boolean; checkedAt: number | null; set: (online: boolean) => void };

export const useConnectivity = create<Connectivity>()((set) => ({
  online: typeof navigator === 'undefined' ? true : navigator.onLine !== false,
  checkedAt: null,
  set: (online) => set({ online, checkedAt: Date.now() }),
}));

export async function checkServer(): Promise<boolean> {
  const controller = new AbortController();
  const timer = setTimeout(() => controller.abort(), 4000);
  try {
    const response = await fetch(`${API_BASE_URL}/api/health`, { cache: 'no-store', signal: controller.signal });
    return response.ok;
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}

/** Keeps `useConnectivity` current while mounted: on browser online/offline events and every 15 s. */
export function useConnectivityWatch(onBackOnline?: () => void) {
  useEffect(() => {
    if (typeof window === 'undefined') return;
    let stopped = false;
    const probe = async () => {
      const was = useConnectivity.getState().online;
      const now = navigator.onLine !== false && (await checkServer());
      if (stopped) return;
      useConnectivity.getState().set(now);
      if (now && !was) onBackOnline?.();
    };
    const offline = () => useConnectivity.getState().set(false);
    window.addEventListener('online', probe);
    window.addEventListener('offline', offline);
    const timer = setInterval(probe, 15_000);
    void probe();
    return () => {
      stopped = true;
      window.removeEventListener('online', probe);
      window.removeEventListener('offline', offline);
      clearInterval(timer);
    };
  }, [onBackOnline]);
}

/** How often an owed sign-out is tried again while the app is open and the browser thinks it is online. */
const PENDING_SIGN_OUT_RETRY_MS = 15_000;

let pendingWatchStarted = false;

/**
 * Sends an owed sign-out (store/pending-sign-out.ts) whenever the server may be back: the browser's
 * 'online' event, the connectivity store turning online (the board's health checks), the app
 * coming back to the foreground, and every 15 s while one is owed. The sign-in form has no
 * connectivity watch of its own, hence the timer. Started once, at app start (session bootstrap).
 */
export function watchPendingSignOut() {
  if (pendingWatchStarted || typeof window === 'undefined') return;
  pendingWatchStarted = true;
  const attempt = () => {
    if (!pendingSignOut()) return;
    if (typeof navigator !== 'undefined' && navigator.onLine === false) return;
    void sendPendingSignOut();
  };
  window.addEventListener('online', attempt);
  if (typeof document !== 'undefined') {
    document.addEventListener('visibilitychange', () => {
      if (document.visibilityState === 'visible') attempt();
    });
  }
  useConnectivity.subscribe((now, before) => {
    if (now.online && !before.online) attempt();
  });
  setInterval(attempt, PENDING_SIGN_OUT_RETRY_MS);
}
