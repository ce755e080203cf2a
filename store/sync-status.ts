/**
 * Sync state for the screens (zustand) and the triggers that start a run.
 *
 * - `runSync(teamId, onChanged?)` runs one sync with the HTTP transport and the open device store.
 *   It never throws and never starts a second run: while a run is going, a call for the same team
 *   returns the running promise (a call for another team runs after it). It resolves to the run's
 *   result, or null when the run failed (the reason is in `error`).
 * - `useSyncTriggers(teamId, onChanged)` runs it: when the board opens, on reconnect (the
 *   browser's 'online' event or useConnectivity turning online), when the app comes back into
 *   view, 5 s after the last local change (poll of the pending count every 2 s, or
 *   `notifyLocalChange()` right after a write), and again with growing pauses after a failure.
 * - `onChanged` is called after every run (success or not), for the caller to refetch the
 *   device queries (e.g. `client.invalidateQueries({ queryKey: boardKeys.all })`).
 */
import { useEffect, useRef } from 'react';
import { v5 as uuidv5 } from 'uuid';
import { useSession } from './session';
import { create } from 'zustand';
import { deviceStore } from '../sync';
import { synchronize, type SyncResult } from '../sync/engine';
import { SyncError } from '../sync/errors';
import type { SyncProgress } from '../sync/pull';
import { SyncScheduler } from '../sync/scheduler';
import type { OutboxEntry } from '../sync/store';
import { useConnectivity } from './connectivity';
import { syncTransportFor } from './sync-transport';

export type SyncStatus = {
  /** The team the figures below are about. */
  teamId: string | null;
  running: boolean;
  /** Server time of the last successful run (ISO), or null if this team never synced here. */
  lastSyncAt: string | null;
  /** During a long pull: records fetched so far and in all. */
  progress: SyncProgress | null;
  /** Why the last run failed (a sentence naming the step), or null. */
  error: string | null;
  /** Records with changes waiting to be sent (a note edited twice offline is one): every counter shows this. */
  pending: number;
  /** Changes the server refused, waiting for the coach (see listRejectedChanges). */
  rejected: number;
};

/** Namespace for per-(device, user) client ids. */
const CLIENT_NAMESPACE = '2b7f3c1e-9d4a-4f0b-8e6c-5a1d2c3b4e5f';

export const useSyncStatus = create<SyncStatus>()(() => ({
  teamId: null,
  running: false,
  lastSyncAt: null,
  progress: null,
  error: null,
  pending: 0,
  rejected: 0,
}));

/** Re-reads lastSyncAt and the pending / rejected counts from the device. */
export async function refreshSyncStatus(teamId: string): Promise<void> {
  const store = await deviceStore();
  const [lastSyncAt, pending, rejected] = await Promise.all([store.lastSyncAt(teamId), store.pendingRecordCount(teamId), store.rejectedCount(teamId)]);
  useSyncStatus.setState({ teamId, lastSyncAt, pending, rejected });
}

let inFlight: { teamId: string; promise: Promise<SyncResult | null> } | null = null;

export function runSync(teamId: string, onChanged?: () => void): Promise<SyncResult | null> {
  if (inFlight) {
    if (inFlight.teamId === teamId) return inFlight.promise;
    return inFlight.promise.then(() => runSync(teamId, onChanged));
  }
  const promise = (async (): Promise<SyncResult | null> => {
    useSyncStatus.setState({ teamId, running: true, progress: null });
    try {
      const store = await deviceStore();
      const userId = useSession.getState().user?.id;
      if (!userId) throw new Error('Sign in to sync');
      const result = await synchronize({
        store,
        transport: syncTransportFor(() => useSession.getState().user?.id === userId),
        teamId,
        // Only this user's outbox and cursor; the run stops if someone else opens the device.
        userId,
        // The server ties a client id to one user: a device shared by two coaches is two clients.
        clientId: uuidv5(`${store.clientId}/${userId}`, CLIENT_NAMESPACE),
        onProgress: (progress) => useSyncStatus.setState({ progress }),
      });
      useSyncStatus.setState({ error: null });
      return result;
    } catch (error) {
      useSyncStatus.setState({ error: error instanceof SyncError || error instanceof Error ? error.message : String(error) });
      return null;
    } finally {
      useSyncStatus.setState({ running: false, progress: null });
      await refreshSyncStatus(teamId).catch(() => undefined);
      try {
        onChanged?.();
      } catch {
        // The caller's refetch must not break the sync state.
      }
    }
  })().finally(() => {
    inFlight = null;
  });
  inFlight = { teamId, promise };
  return promise;
}

const localChangeListeners = new Set<() => void>();

/** Call after a local write to start the quiet-period countdown right away (optional: polled too). */
export function notifyLocalChange(): void {
  // At least this change waits now; the exact count follows with the next poll or run.
  if (useSyncStatus.getState().pending === 0) useSyncStatus.setState({ pending: 1 });
  for (const listener of localChangeListeners) listener();
}

/** The refused changes of a team, oldest first, each with `rejectReason` and `lastError`. */
export async function listRejectedChanges(teamId: string): Promise<OutboxEntry[]> {
  return (await deviceStore()).listRejected(teamId);
}

/** Sends a refused change again, right away. */
export async function retryRejectedChange(teamId: string, opId: string, onChanged?: () => void): Promise<void> {
  await (await deviceStore()).retryRejected(opId);
  await refreshSyncStatus(teamId);
  void runSync(teamId, onChanged);
}

/** Gives a refused change up (a refused new record disappears from this device). */
export async function discardRejectedChange(teamId: string, opId: string, onChanged?: () => void): Promise<void> {
  await (await deviceStore()).discardRejected(opId);
  await refreshSyncStatus(teamId);
  onChanged?.();
}

const POLL_MS = 2_000;

export function useSyncTriggers(teamId: string | null | undefined, onChanged?: () => void): void {
  const changedRef = useRef(onChanged);
  changedRef.current = onChanged;

  useEffect(() => {
    if (!teamId) return;
    const scheduler = new SyncScheduler({
      run: async () => (await runSync(teamId, () => changedRef.current?.())) !== null,
      canRun: () => useConnectivity.getState().online,
    });
    const cleanups: (() => void)[] = [() => scheduler.dispose()];

    void refreshSyncStatus(teamId).catch(() => undefined);
    void scheduler.request();

    const hasWindowEvents = typeof window !== 'undefined' && typeof window.addEventListener === 'function';
    if (hasWindowEvents) {
      const online = () => void scheduler.request(false);
      window.addEventListener('online', online);
      cleanups.push(() => window.removeEventListener('online', online));
    }
    if (typeof document !== 'undefined' && typeof document.addEventListener === 'function') {
      // Back in view: catch up. Going out of view (another app, the phone locked, the tab
      // closing): send what waits now rather than after the quiet period, which may never come.
      const visibility = () => {
        if (document.visibilityState === 'visible' || useSyncStatus.getState().pending > 0) void scheduler.request();
      };
      document.addEventListener('visibilitychange', visibility);
      cleanups.push(() => document.removeEventListener('visibilitychange', visibility));
    }
    if (hasWindowEvents) {
      // Closing or reloading the tab with changes not yet on the server: the browser asks first.
      // (They are safe on the device either way; the warning is for a borrowed phone or a
      // browser that clears its storage.)
      const leaving = (event: BeforeUnloadEvent) => {
        if (useSyncStatus.getState().pending === 0) return;
        event.preventDefault();
        event.returnValue = '';
      };
      window.addEventListener('beforeunload', leaving);
      cleanups.push(() => window.removeEventListener('beforeunload', leaving));
    }
    cleanups.push(
      useConnectivity.subscribe((now, before) => {
        if (now.online && !before.online) void scheduler.request();
      }),
    );

    const changed = () => scheduler.changed();
    localChangeListeners.add(changed);
    cleanups.push(() => localChangeListeners.delete(changed));

    let lastPending = -1;
    const poll = setInterval(() => {
      void (async () => {
        const store = await deviceStore();
        // Entries, not records: a second edit of a waiting note is a change to send too.
        const entries = await store.pendingCount(teamId);
        if (lastPending >= 0 && entries > lastPending) scheduler.changed();
        lastPending = entries;
        const pending = await store.pendingRecordCount(teamId);
        if (useSyncStatus.getState().pending !== pending) useSyncStatus.setState({ pending });
      })().catch(() => undefined);
    }, POLL_MS);
    cleanups.push(() => clearInterval(poll));

    return () => {
      for (const cleanup of cleanups) cleanup();
    };
  }, [teamId]);
}
