/**
 * The outbox: every local change waits here, one entry per op, until the server acknowledges it
 * (shared/SYNC.md, "On the device"). Entries are written in the same transaction as their row;
 * each names its user, so on a shared device one person's unsent changes are never counted,
 * shown, sent or given up by another. Push (sync/push.ts) sends and settles them; this module
 * writes them, counts them, and handles the ones the server refused.
 *
 * All functions run inside the caller's transaction unless they open one through `ctx.tx`.
 */
import { v7 as uuidv7 } from 'uuid';
import { fieldsOf, isSyncTableName, pushableTables, tableSpec } from '../shared/sync-tables';
import type { SqlDriver } from './driver';
import { insertRecord, writeFields } from './fields';
import { captureShadow, releaseDiscarded } from './shadow';
import { StoreError, type FieldClocks, type NewOp, type OwnerFilter, type StoreContext, type SyncedTable } from './store-context';

export interface OutboxEntry {
  seq: number;
  opId: string;
  teamId: string;
  userId: string;
  table: SyncedTable;
  recordId: string;
  kind: 'upsert' | 'delete';
  fields: Record<string, unknown>;
  hlc: Record<string, string>;
  attempts: number;
  lastError: string | null;
  status: 'pending' | 'rejected';
  /** For a rejected op: the server's reason (validation | permission | unknown_record). */
  rejectReason: string | null;
  sentAt: string | null;
  createdAt: string;
}

export type OutboxRow = {
  seq: number;
  op_id: string;
  team_id: string;
  user_id: string;
  tbl: SyncedTable;
  record_id: string;
  kind: 'upsert' | 'delete';
  fields: string;
  hlc: string;
  attempts: number;
  last_error: string | null;
  status: 'pending' | 'rejected';
  reject_reason: string | null;
  sent_at: string | null;
  created_at: string;
};

export const toOutboxEntry = (r: OutboxRow): OutboxEntry => ({
  seq: r.seq,
  opId: r.op_id,
  teamId: r.team_id,
  userId: r.user_id,
  table: r.tbl,
  recordId: r.record_id,
  kind: r.kind,
  fields: JSON.parse(r.fields),
  hlc: JSON.parse(r.hlc),
  attempts: r.attempts,
  lastError: r.last_error,
  status: r.status,
  rejectReason: r.reject_reason ?? null,
  sentAt: r.sent_at,
  createdAt: r.created_at,
});

/**
 * Tables whose device rows stay, hidden (`deleted = 1`), while their delete waits to be sent
 * (shared/sync-tables.ts `deletes: 'tombstone'`: observations, runs, crossings).
 */
export const hidesDeleted = (table: string): boolean => isSyncTableName(table) && tableSpec(table).deletes === 'tombstone';

export const ownerFilter = (owner: string | undefined, column = 'user_id'): OwnerFilter =>
  owner === undefined ? { sql: '', params: [] } : { sql: ` AND ${column} = ?`, params: [owner] };

/**
 * Writes one outbox entry; `createdAt` is when the change was made (device time, corrected). The
 * value an edit replaces goes to the shadow first, so a discarded edit can put it back.
 */
export async function writeEntry(db: SqlDriver, op: NewOp, createdAt: string): Promise<FieldClocks> {
  if (op.previous) await captureShadow(db, op.table, op.recordId, op.previous);
  // A delete carries its clock under "deleted" so the server can order it against edits.
  const fieldHlc = op.kind === 'delete' ? { deleted: op.hlc } : Object.fromEntries(Object.keys(op.fields).map((field) => [field, op.hlc]));
  await db.run(
    `INSERT INTO outbox (op_id, team_id, user_id, tbl, record_id, kind, fields, hlc, created_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    [uuidv7(), op.teamId, op.userId, op.table, op.recordId, op.kind, JSON.stringify(op.fields), JSON.stringify(fieldHlc), createdAt],
  );
  return fieldHlc;
}

/** Merges per-field clock values into a row's `hlc` column. */
export async function stampRow(db: SqlDriver, table: SyncedTable, id: string, fieldHlc: FieldClocks): Promise<void> {
  await db.run(`UPDATE ${table} SET hlc = json_patch(hlc, ?) WHERE id = ?`, [JSON.stringify(fieldHlc), id]);
}

/**
 * An edit of a held record: the changed fields are written to the row, queued with the values
 * they replace, and the row takes the edit's clock values. Inside the caller's transaction.
 */
export async function queueEdit(
  ctx: StoreContext,
  edit: { teamId: string; userId: string; table: SyncedTable; recordId: string; fields: Record<string, unknown>; previous: Record<string, unknown> },
): Promise<void> {
  await writeFields(ctx.db, edit.table, edit.recordId, edit.fields);
  const fieldHlc = await ctx.enqueue({ ...edit, kind: 'upsert', hlc: ctx.tick() });
  await stampRow(ctx.db, edit.table, edit.recordId, fieldHlc);
}

const teamFilter = (teamId?: string) => (teamId ? { sql: ' AND team_id = ?', params: [teamId] } : { sql: '', params: [] });

/** How many of the signed-in user's entries have this status (optionally for one team). */
export async function countOutbox(ctx: StoreContext, status: 'pending' | 'rejected', teamId?: string): Promise<number> {
  const mine = ctx.mine();
  const team = teamFilter(teamId);
  const [{ n }] = await ctx.db.all<{ n: number }>(`SELECT count(*) AS n FROM outbox WHERE status = ?${team.sql}${mine.sql}`, [
    status,
    ...team.params,
    ...mine.params,
  ]);
  return n;
}

/**
 * How many records (a note, a session, a cue) have changes waiting to be sent: what the coach
 * reads as "changes waiting". A note taken and then edited twice offline is three entries but one
 * waiting change. (countOutbox counts entries: the sync triggers watch it grow.)
 */
export async function countPendingRecords(ctx: StoreContext, teamId?: string): Promise<number> {
  const mine = ctx.mine();
  const team = teamFilter(teamId);
  const [{ n }] = await ctx.db.all<{ n: number }>(
    `SELECT count(*) AS n FROM (SELECT DISTINCT tbl, record_id FROM outbox WHERE status = 'pending'${team.sql}${mine.sql})`,
    [...team.params, ...mine.params],
  );
  return n;
}

/** Changes the server refused, oldest first, each with its reason (the signed-in user's only). */
export async function listRejected(ctx: StoreContext, teamId?: string): Promise<OutboxEntry[]> {
  const mine = ctx.mine();
  const team = teamFilter(teamId);
  const rows = await ctx.db.all<OutboxRow>(`SELECT * FROM outbox WHERE status = 'rejected'${team.sql}${mine.sql} ORDER BY seq`, [
    ...team.params,
    ...mine.params,
  ]);
  return rows.map(toOutboxEntry);
}

/** Records with waiting changes per table, for a status line that says what is waiting. */
export async function pendingByTable(ctx: StoreContext, teamId?: string): Promise<Record<SyncedTable, number>> {
  const mine = ctx.mine();
  const team = teamFilter(teamId);
  const rows = await ctx.db.all<{ tbl: SyncedTable; n: number }>(
    `SELECT tbl, count(DISTINCT record_id) AS n FROM outbox WHERE status = 'pending'${team.sql}${mine.sql} GROUP BY tbl`,
    [...team.params, ...mine.params],
  );
  const counts: Record<SyncedTable, number> = { observations: 0, sessions: 0, cues: 0, runs: 0, crossings: 0, targets: 0 };
  for (const r of rows) counts[r.tbl] = r.n;
  return counts;
}

/** The signed-in user's outbox, oldest first. */
export async function listOutbox(ctx: StoreContext, limit: number): Promise<OutboxEntry[]> {
  const mine = ctx.mine();
  const rows = await ctx.db.all<OutboxRow>(`SELECT * FROM outbox WHERE 1 = 1${mine.sql} ORDER BY seq LIMIT ?`, [...mine.params, limit]);
  return rows.map(toOutboxEntry);
}

/**
 * Sends a rejected change again with the next sync (the coach fixed what was wrong). It goes
 * under a new op id: the server's op log has settled the old one as rejected and would only
 * repeat that answer.
 */
export function retryRejected(ctx: StoreContext, opId: string): Promise<void> {
  return ctx.tx(async () => {
    const mine = ctx.mine();
    const { changes } = await ctx.db.run(
      `UPDATE outbox SET op_id = ?, status = 'pending', attempts = 0, last_error = NULL, reject_reason = NULL, sent_at = NULL
       WHERE op_id = ? AND status = 'rejected'${mine.sql}`,
      [uuidv7(), opId, ...mine.params],
    );
    if (changes === 0) throw new StoreError('That change is no longer waiting');
  });
}

/**
 * Gives up a rejected change. A rejected create takes its local record (and the edits queued
 * on it) along; a rejected edit puts back the previous value; a rejected delete shows the
 * record again.
 */
export function discardRejected(ctx: StoreContext, opId: string): Promise<void> {
  const { db } = ctx;
  return ctx.tx(async () => {
    // Only the signed-in user's own refused changes can be given up (another user's are parked).
    const mine = ctx.mine();
    const [row] = await db.all<OutboxRow>(`SELECT * FROM outbox WHERE op_id = ? AND status = 'rejected'${mine.sql}`, [opId, ...mine.params]);
    if (!row) throw new StoreError('That change is no longer waiting');
    const entry = toOutboxEntry(row);
    const own = ownerFilter(entry.userId);
    const [first] = await db.all<{ seq: number }>(`SELECT min(seq) AS seq FROM outbox WHERE tbl = ? AND record_id = ?${own.sql}`, [
      entry.table,
      entry.recordId,
      ...own.params,
    ]);
    const [record] = await db.all<{ synced: number }>(`SELECT synced FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
    const isCreate = entry.kind === 'upsert' && first.seq === entry.seq && (!record || record.synced === 0);
    if (isCreate) {
      await db.run(`DELETE FROM outbox WHERE tbl = ? AND record_id = ?${own.sql}`, [entry.table, entry.recordId, ...own.params]);
      await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [entry.table, entry.recordId]);
      await db.run(`DELETE FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
      return;
    }
    await db.run(`DELETE FROM outbox WHERE seq = ?`, [entry.seq]);
    if (entry.kind === 'delete') {
      const [{ n }] = await db.all<{ n: number }>(
        `SELECT count(*) AS n FROM outbox WHERE tbl = ? AND record_id = ? AND kind = 'delete'${own.sql}`,
        [entry.table, entry.recordId, ...own.params],
      );
      if (n === 0 && hidesDeleted(entry.table)) await db.run(`UPDATE ${entry.table} SET deleted = 0 WHERE id = ?`, [entry.recordId]);
      return;
    }
    await releaseDiscarded(db, entry.table, entry.recordId, { seq: entry.seq, fields: entry.fields }, entry.userId);
  });
}

/**
 * The fields an outbox upsert must carry to stand for the record's creation: those the table
 * requires, and the author (the server takes it from the token, but the device row needs it).
 * Only such ops can put a record back on the device after a hand-over.
 */
const CREATE_FIELDS = Object.fromEntries(
  pushableTables.map((table) => [table, fieldsOf(table).filter(([, f]) => f.required || f.author).map(([field]) => field)]),
) as unknown as Record<SyncedTable, readonly string[]>;

/**
 * Puts a user's own waiting changes back into the emptied tables, oldest first: a create (an
 * upsert carrying every field the table needs) inserts the record, a later edit updates it, a
 * delete hides it. Edits of records the device does not hold wait for the pull, which keeps
 * their local values (sync/apply.ts). Runs inside the hand-over's transaction.
 */
export async function replayOwnOutbox(db: SqlDriver, userId: string): Promise<void> {
  const rows = await db.all<OutboxRow>(`SELECT * FROM outbox WHERE user_id = ? ORDER BY seq`, [userId]);
  for (const entry of rows.map(toOutboxEntry)) {
    if (entry.kind === 'delete') {
      if (hidesDeleted(entry.table)) await db.run(`UPDATE ${entry.table} SET deleted = 1 WHERE id = ?`, [entry.recordId]);
      continue;
    }
    const [held] = await db.all<{ id: string }>(`SELECT id FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
    if (held) {
      await writeFields(db, entry.table, entry.recordId, entry.fields);
    } else if (CREATE_FIELDS[entry.table].every((field) => Object.prototype.hasOwnProperty.call(entry.fields, field))) {
      await insertRecord(db, entry.table, { id: entry.recordId, teamId: entry.teamId }, entry.fields);
    } else {
      continue;
    }
    await stampRow(db, entry.table, entry.recordId, entry.hlc);
  }
}

