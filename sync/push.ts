/**
 * Push: sends the team's pending outbox entries to the server in seq order and settles each one
 * by the server's answer (shared/SYNC.md, "Push").
 *
 * - Batches hold at most `batchSize` (<= 500) ops and about 900 KB of JSON.
 * - Entries are marked `sent_at` (in the same transaction that picks them) before the request
 *   goes out: from then on the server may have them, so undo must send a delete instead of
 *   quietly dropping the create.
 * - The reply is settled in ONE device transaction: applied/duplicate entries leave the outbox and
 *   their records become `synced`; rejected ones stay, marked 'rejected' with the reason, and are
 *   not sent again until the coach retries them. The server clock is folded into the device's.
 * - No answer (offline, timeout, 5xx): attempts + 1 and last_error on the batch, the entries stay
 *   pending, and the error is thrown. Sending them again is safe: the server's op log answers
 *   `duplicate` for ops it already applied.
 * - A request refused as malformed (400/413/422) is split in halves until the one bad op is found;
 *   only that op is rejected.
 */
import { SYNC_PUSH_MAX_OPS, type Op, type PushReply } from '../shared/schemas/sync';
import type { SqlDriver } from './driver';
import { toOutboxEntry, type OutboxEntry } from './outbox';
import { releaseAcknowledged } from './shadow';
import type { DeviceStore } from './store';
import type { SyncedTable } from './store-context';
import { RequestRefused, type SyncTransport } from './transport';

export const PUSH_MAX_BYTES = 900_000;

export interface PushOptions {
  teamId: string;
  clientId: string;
  /**
   * The user whose outbox is sent (default: the user the store is open for). Other users'
   * entries on a shared device are never picked; if someone else opens the store meanwhile, the
   * push stops at its next device transaction.
   */
  userId?: string;
  /** Ops per request, at most 500. */
  batchSize?: number;
  /** Approximate JSON bytes per request. */
  maxBytes?: number;
}

export interface PushSummary {
  batches: number;
  sent: number;
  acknowledged: number;
  rejected: number;
  /** Server time from the last reply, if any request was answered. */
  serverTime: string | null;
}

/** UTF-8 length of a string, without allocating (TextEncoder is not everywhere). */
export function utf8Length(text: string): number {
  let bytes = 0;
  for (let i = 0; i < text.length; i += 1) {
    const code = text.charCodeAt(i);
    if (code < 0x80) bytes += 1;
    else if (code < 0x800) bytes += 2;
    else if (code >= 0xd800 && code <= 0xdbff) {
      bytes += 4;
      i += 1;
    } else bytes += 3;
  }
  return bytes;
}

export const toOp = (e: OutboxEntry): Op => ({ opId: e.opId, table: e.table, recordId: e.recordId, kind: e.kind, fields: e.fields, hlc: e.hlc });

/** Room for `{"clientId":"…","teamId":"…","ops":[…]}` around the ops. */
const BODY_OVERHEAD = 200;

export async function pushOutbox(store: DeviceStore, transport: SyncTransport, options: PushOptions): Promise<PushSummary> {
  const { teamId, clientId } = options;
  const batchSize = Math.max(1, Math.min(options.batchSize ?? SYNC_PUSH_MAX_OPS, SYNC_PUSH_MAX_OPS));
  const maxBytes = options.maxBytes ?? PUSH_MAX_BYTES;
  const sync = 'userId' in options ? store.syncInternals(options.userId) : store.syncInternals();
  const { db, mine } = sync;
  const summary: PushSummary = { batches: 0, sent: 0, acknowledged: 0, rejected: 0, serverTime: null };

  /** Picks the next batch after `afterSeq` and marks it sent, in one transaction. */
  const claim = (afterSeq: number) =>
    sync.transaction(async () => {
      const rows = await db.all<Parameters<typeof toOutboxEntry>[0]>(
        `SELECT * FROM outbox WHERE team_id = ? AND status = 'pending'${mine.sql} AND seq > ? ORDER BY seq LIMIT ?`,
        [teamId, ...mine.params, afterSeq, batchSize],
      );
      const batch: OutboxEntry[] = [];
      let bytes = BODY_OVERHEAD;
      for (const row of rows) {
        const entry = toOutboxEntry(row);
        const size = utf8Length(JSON.stringify(toOp(entry))) + 1;
        if (batch.length > 0 && bytes + size > maxBytes) break;
        batch.push(entry);
        bytes += size;
      }
      if (batch.length > 0) {
        await db.run(`UPDATE outbox SET sent_at = coalesce(sent_at, ?) WHERE seq IN (SELECT value FROM json_each(?))`, [
          new Date().toISOString(),
          JSON.stringify(batch.map((e) => e.seq)),
        ]);
      }
      return batch;
    });

  const recordFailure = (batch: OutboxEntry[], error: unknown) =>
    sync.transaction(async () => {
      await db.run(`UPDATE outbox SET attempts = attempts + 1, last_error = ? WHERE seq IN (SELECT value FROM json_each(?))`, [
        error instanceof Error ? error.message : String(error),
        JSON.stringify(batch.map((e) => e.seq)),
      ]);
    });

  const reject = (entry: OutboxEntry, reason: string, message: string) =>
    db.run(`UPDATE outbox SET status = 'rejected', reject_reason = ?, last_error = ?, attempts = attempts + 1 WHERE seq = ?`, [
      reason,
      message,
      entry.seq,
    ]);

  const settle = (batch: OutboxEntry[], reply: PushReply) =>
    sync.transaction(async () => {
      const results = new Map(reply.results.map((r) => [r.opId, r]));
      const acknowledged: OutboxEntry[] = [];
      for (const entry of batch) {
        const result = results.get(entry.opId);
        if (!result) {
          await db.run(`UPDATE outbox SET attempts = attempts + 1, last_error = ? WHERE seq = ?`, ['The server did not answer for this change', entry.seq]);
        } else if (result.status === 'rejected' || (result.status === 'duplicate' && result.reason)) {
          // A duplicate carrying a reason repeats an earlier rejection.
          await reject(entry, result.reason ?? 'validation', result.message ?? describeReason(result.reason));
          summary.rejected += 1;
        } else {
          acknowledged.push(entry);
        }
      }
      await acknowledge(db, acknowledged, sync.owner);
      summary.acknowledged += acknowledged.length;
      sync.receiveClock(reply.serverClock);
      summary.serverTime = reply.serverTime;
    });

  const send = async (batch: OutboxEntry[]): Promise<void> => {
    let reply: PushReply;
    try {
      summary.batches += 1;
      reply = await transport.push({ clientId, teamId, ops: batch.map(toOp) });
    } catch (error) {
      if (error instanceof RequestRefused) {
        if (batch.length > 1) {
          const half = Math.ceil(batch.length / 2);
          await send(batch.slice(0, half));
          await send(batch.slice(half));
          return;
        }
        await sync.transaction(() => reject(batch[0], 'validation', error.message));
        summary.rejected += 1;
        return;
      }
      await recordFailure(batch, error);
      throw error;
    }
    await settle(batch, reply);
  };

  let afterSeq = 0;
  for (;;) {
    const batch = await claim(afterSeq);
    if (batch.length === 0) break;
    afterSeq = batch[batch.length - 1].seq;
    summary.sent += batch.length;
    await send(batch);
  }
  return summary;
}

function describeReason(reason: string | undefined): string {
  switch (reason) {
    case 'permission':
      return 'You are not allowed to make this change.';
    case 'unknown_record':
      return 'The record this change belongs to no longer exists on the server.';
    default:
      return 'The server could not accept this change.';
  }
}

/** Acknowledged entries leave the outbox; their records are now known to the server. */
async function acknowledge(db: SqlDriver, entries: OutboxEntry[], userId: string | undefined): Promise<void> {
  if (entries.length === 0) return;
  await db.run(`DELETE FROM outbox WHERE seq IN (SELECT value FROM json_each(?))`, [JSON.stringify(entries.map((e) => e.seq))]);
  const upserts = new Map<SyncedTable, Set<string>>();
  for (const e of entries) {
    if (e.kind !== 'upsert') continue;
    if (!upserts.has(e.table)) upserts.set(e.table, new Set());
    upserts.get(e.table)!.add(e.recordId);
  }
  for (const [table, ids] of upserts) {
    await db.run(`UPDATE ${table} SET synced = 1 WHERE id IN (SELECT value FROM json_each(?))`, [JSON.stringify([...ids])]);
  }
  // Shadows exist only for records with edits: look them up once for the whole batch.
  const shadowed = new Set(
    (
      await db.all<{ tbl: string; record_id: string }>(
        `SELECT tbl, record_id FROM sync_shadow WHERE record_id IN (SELECT value FROM json_each(?))`,
        [JSON.stringify([...new Set(entries.map((e) => e.recordId))])],
      )
    ).map((r) => `${r.tbl}/${r.record_id}`),
  );
  for (const e of entries) {
    if (e.kind === 'delete') {
      // The server has the delete: the local tombstone row can go once nothing else waits on it.
      const [{ n }] = await db.all<{ n: number }>(`SELECT count(*) AS n FROM outbox WHERE tbl = ? AND record_id = ?`, [e.table, e.recordId]);
      if (n === 0) {
        await db.run(`DELETE FROM ${e.table} WHERE id = ?`, [e.recordId]);
        await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [e.table, e.recordId]);
      }
    } else if (shadowed.has(`${e.table}/${e.recordId}`)) {
      await releaseAcknowledged(db, e.table, e.recordId, e.fields, userId);
    }
  }
}
