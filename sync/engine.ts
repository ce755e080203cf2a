/**
 * One sync run: push the outbox, then pull until the server has nothing more (shared/SYNC.md).
 *
 * One run at a time per device store: a call made while a run is going is REFUSED with SyncBusy
 * (it does not join the running one; store/sync-status.ts's runSync is the one that coalesces).
 * Failures throw SyncError naming the step: 'push', 'pull' or 'apply'. Pull does not run when
 * push failed (the server is unreachable anyway, and pull must not overtake unsent edits' acks).
 * A successful run records the server time of its last page as the team's lastSyncAt.
 */
import { SyncBusy, SyncError, wrapStep } from './errors';
import { pullAll, type PullSummary, type SyncProgress } from './pull';
import { pushOutbox, type PushSummary } from './push';
import { metaKeys, type DeviceStore } from './store';
import type { SyncTransport } from './transport';

export interface SynchronizeOptions {
  store: DeviceStore;
  transport: SyncTransport;
  teamId: string;
  /** Defaults to store.clientId (the device id). */
  clientId?: string;
  onProgress?: (progress: SyncProgress) => void;
  /** Push batch size (<= 500) and pull page size (<= 1000); tests make them small. */
  batchSize?: number;
  pageSize?: number;
}

export interface SyncResult {
  push: PushSummary;
  pull: PullSummary;
  /** Server time of this run (now the team's lastSyncAt). */
  lastSyncAt: string | null;
}

const running = new WeakMap<DeviceStore, Promise<SyncResult>>();

export const isSyncRunning = (store: DeviceStore) => running.has(store);

export function synchronize(options: SynchronizeOptions): Promise<SyncResult> {
  const { store } = options;
  if (running.has(store)) return Promise.reject(new SyncBusy());
  const run = runOnce(options).finally(() => running.delete(store));
  running.set(store, run);
  return run;
}

async function runOnce({ store, transport, teamId, clientId, onProgress, batchSize, pageSize }: SynchronizeOptions): Promise<SyncResult> {
  if (transport.time) {
    // Best effort: a device that cannot ask the time still syncs (the server clamps its clocks).
    await store.correctClock(() => transport.time!()).catch(() => undefined);
  }
  let push: PushSummary;
  try {
    push = await pushOutbox(store, transport, { teamId, clientId: clientId ?? store.clientId, batchSize });
  } catch (error) {
    throw wrapStep('push', error);
  }
  let pull: PullSummary;
  try {
    pull = await pullAll(store, transport, teamId, onProgress, { limit: pageSize });
  } catch (error) {
    throw wrapStep('pull', error);
  }
  const lastSyncAt = pull.serverTime ?? push.serverTime;
  if (lastSyncAt) {
    try {
      const sync = store.syncInternals();
      await sync.transaction(() =>
        sync.db.run(`INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [
          metaKeys.lastSyncAt(teamId),
          lastSyncAt,
        ]),
      );
    } catch (error) {
      throw new SyncError('apply', error);
    }
  }
  return { push, pull, lastSyncAt };
}
