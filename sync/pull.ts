/**
 * Pull: reads the team's changes page by page from the saved cursor until the server says there
 * is no more, applying each page (with its cursor) in one transaction. Interrupted anywhere - a
 * lost page, a failed apply, the app killed - the next run starts from the last applied page.
 *
 * A 410 (cursor older than the server's tombstone retention) starts a full re-sync: the cursor
 * goes back to 0 and the team's synced rows are marked unconfirmed; rows the re-sync does not
 * bring back are swept when it completes, except those the unsent outbox refers to. The outbox
 * itself is never touched. Until the sweep, the board keeps showing what it had.
 */
import { SYNC_PULL_MAX_LIMIT } from '../shared/schemas/sync';
import { applyPullPage, beginFullResync } from './apply';
import { SyncError } from './errors';
import type { DeviceStore } from './store';
import { ResyncRequired, type SyncTransport } from './transport';

export interface SyncProgress {
  /** Changes, tombstones and evictions applied so far in this run. */
  done: number;
  /** done + what the server says remains. */
  total: number;
}

export interface PullSummary {
  pages: number;
  changes: number;
  tombstones: number;
  evictions: number;
  /** A 410 made this run start over from cursor 0. */
  resynced: boolean;
  cursor: number;
  /** Server time of the last page. */
  serverTime: string | null;
}

export interface PullOptions {
  /** Page size, at most 1000. */
  limit?: number;
  /**
   * The user the pull is for (default: the user the store is open for). The cursor is theirs;
   * if someone else opens the store meanwhile, the next page is not applied (OwnerChanged).
   */
  userId?: string;
}

export async function pullAll(
  store: DeviceStore,
  transport: SyncTransport,
  teamId: string,
  onProgress?: (progress: SyncProgress) => void,
  options: PullOptions = {},
): Promise<PullSummary> {
  const limit = Math.max(1, Math.min(options.limit ?? SYNC_PULL_MAX_LIMIT, SYNC_PULL_MAX_LIMIT));
  const summary: PullSummary = { pages: 0, changes: 0, tombstones: 0, evictions: 0, resynced: false, cursor: 0, serverTime: null };
  const sync = 'userId' in options ? store.syncInternals(options.userId) : store.syncInternals();
  const userId = sync.owner;
  const cursorKey = sync.keys(teamId).cursor;
  let done = 0;
  for (;;) {
    const cursor = Number((await store.getMeta(cursorKey)) ?? 0);
    let page;
    try {
      page = await transport.pull({ teamId, cursor, limit });
    } catch (error) {
      if (error instanceof ResyncRequired && !summary.resynced) {
        summary.resynced = true;
        try {
          await beginFullResync(store, teamId, { userId });
        } catch (cause) {
          throw new SyncError('apply', cause);
        }
        done = 0;
        continue;
      }
      throw new SyncError('pull', error);
    }
    try {
      await applyPullPage(store, teamId, page, { userId });
    } catch (error) {
      throw new SyncError('apply', error);
    }
    summary.pages += 1;
    summary.changes += page.changes.length;
    summary.tombstones += page.tombstones.length;
    summary.evictions += page.evictions.length;
    summary.cursor = page.nextCursor;
    summary.serverTime = page.serverTime;
    done += page.changes.length + page.tombstones.length + page.evictions.length;
    onProgress?.({ done, total: done + Math.max(0, page.remaining) });
    if (!page.hasMore) return summary;
    if (page.nextCursor <= cursor) {
      throw new SyncError('pull', new Error(`The server did not move the cursor forward (${cursor} -> ${page.nextCursor})`));
    }
  }
}
