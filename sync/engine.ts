/**
 * One sync run: push the outbox, then pull until the server has nothing more (shared/SYNC.md).
 *
 * One run at a time per device store: a call made while a run is going is REFUSED with SyncBusy
 * (it does not join the running one; store/sync-status.ts's runSync is the one that coalesces).
 * Failures throw SyncError naming the step: 'push', 'pull' or 'apply'.
 *
 * A failed push does not stop the pull (shared/SYNC.md): when the server answered - a batch refused
 * with a 4xx/5xx, an error while settling the reply - the device still receives, and the push
 * error is reported once the pull is done. Only when nothing answered at all (no network) is the
 * pull skipped: it could not reach the server either. Unsent edits keep their local values through
 * the pull (sync/apply.ts), and rejected ops stay out of later pushes, so nothing loops.
 * A run whose pull completed records the server time of its last page as the team's lastSyncAt.
 *
 * The run works for one user (`userId`, default the user the store is open for): it sends only
 * their outbox, pulls with their cursor, and stops at the next device transaction if someone else
 * opens the store meanwhile.
 */
import { SyncBusy, SyncError, wrapStep } from './errors';
import { pullAll, type PullSummary, type SyncProgress } from './pull';
import { pushOutbox, type PushSummary } from './push';
import { OwnerChanged, type DeviceStore } from './store';
import { ServerUnavailable, TransportError, type SyncTransport } from './transport';

export interface SynchronizeOptions {
  store: DeviceStore;
  transport: SyncTransport;
  teamId: string;
  /** Defaults to store.clientId (the device id). */
  clientId?: string;
  /** The signed-in user the run is for; defaults to the user the store is open for. */
  userId?: string;
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

export function synchronize(options: SynchronizeOptions): Promise<SyncResult> {
  const { store } = options;
  if (running.has(store)) return Promise.reject(new SyncBusy());
  const run = runOnce(options).finally(() => running.delete(store));
  running.set(store, run);
  return run;
}

/** No answer at all (offline, connection refused, timed out): a pull would not get through either. */
export const isUnreachable = (error: unknown): boolean => {
  const cause = error instanceof SyncError ? error.cause : error;
  return cause instanceof TransportError && !(cause instanceof ServerUnavailable) && cause.status === 0;
};

const EMPTY_PUSH: PushSummary = { batches: 0, sent: 0, acknowledged: 0, rejected: 0, serverTime: null };

async function runOnce({ store, transport, teamId, clientId, userId, onProgress, batchSize, pageSize }: SynchronizeOptions): Promise<SyncResult> {
  // Bound once: every step works for this user, whoever opens the store meanwhile.
  const sync = userId !== undefined ? store.syncInternals(userId) : store.syncInternals();
  const forUser = sync.owner;
  let push: PushSummary = EMPTY_PUSH;
  let pushError: SyncError | null = null;
  let clockChecked = true;
  if (transport.time) {
    // The device's clock is checked against the server's before anything is sent: changes made
    // on a clock that runs far off are moved to real time first (clock-correction.ts). Sent
    // uncorrected, their instants could be refused as from the future, and a sent op is never
    // moved again. So without the server's time, nothing is pushed this run (pull still runs).
    try {
      await store.correctClock(() => transport.time!());
    } catch (error) {
      if (isUnreachable(error)) throw wrapStep('push', error);
      clockChecked = false;
      pushError = wrapStep('push', error);
    }
  }
  if (clockChecked) {
    try {
      push = await pushOutbox(store, transport, { teamId, clientId: clientId ?? store.clientId, batchSize, userId: forUser });
    } catch (error) {
      pushError = wrapStep('push', error);
      if (isUnreachable(error) || error instanceof OwnerChanged) throw pushError;
    }
  }
  let pull: PullSummary;
  try {
    pull = await pullAll(store, transport, teamId, onProgress, { limit: pageSize, userId: forUser });
  } catch (error) {
    // The push failure came first and says more; the pull's is the same outage most of the time.
    throw pushError ?? wrapStep('pull', error);
  }
  const lastSyncAt = pull.serverTime ?? push.serverTime;
  if (lastSyncAt) {
    try {
      await sync.transaction(() =>
        sync.db.run(`INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [
          sync.keys(teamId).lastSyncAt,
          lastSyncAt,
        ]),
      );
    } catch (error) {
      throw pushError ?? new SyncError('apply', error);
    }
  }
  if (pushError) throw pushError;
  return { push, pull, lastSyncAt };
}
