/**
 * Observations: the notes a coach taps at the boards, and a skater's "got it". A tap is the hot
 * path of the whole app (it must commit in a few milliseconds with 50,000 notes stored), so
 * recordObservations costs two inserts per skater and the commit, nothing more.
 */
import { v7 as uuidv7 } from 'uuid';
import { noteSchema, observationPatchSchema, type Mark, type Observation, type ObservationPatch, type Role } from '../../shared/schemas';
import { mayChangeNote } from '../../shared/authors';
import type { SqlValue } from '../driver';
import { decodeRow, insertRecord, selectColumns } from '../fields';
import { queueEdit } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';
import { ensureSessionQueued, getSession } from './sessions';

export interface RecordInput {
  teamId: string;
  userId: string;
  sessionId: string;
  skaterIds: readonly string[];
  cueId: string;
  mark: Mark;
  note?: string;
  noteShared?: boolean;
  /** The signed-in coach's display name, shown as the author at once (the server writes its own). */
  authorName?: string;
  /** Ids for the new observations, one per skater (made by the caller to paint optimistically). */
  ids?: readonly string[];
}

const SELECT = `SELECT id, team_id, ${selectColumns('observations')}`;

/** One tap on a cue chip: an observation for every selected skater, in one transaction. */
export async function recordObservations(ctx: StoreContext, input: RecordInput): Promise<Observation[]> {
  if (input.skaterIds.length === 0) throw new StoreError('Pick at least one skater first');
  if (input.ids && input.ids.length !== input.skaterIds.length) throw new StoreError('One id per skater is needed');
  const note = validate<string>(noteSchema, input.note ?? '');
  const createdAt = new Date(ctx.now()).toISOString();
  return ctx.tx(async () => {
    // A tap is the hot path: once a session is known to be queued (or synced), skip the two
    // look-ups that check it, so a tap costs two inserts and the commit.
    if (!ctx.sessionsQueued.has(input.sessionId)) {
      const session = await getSession(ctx, input.sessionId);
      if (!session) throw new StoreError('Start the session first');
      await ensureSessionQueued(ctx, session, input.userId);
      ctx.sessionsQueued.add(input.sessionId);
    }
    const created: Observation[] = [];
    for (const [index, skaterId] of input.skaterIds.entries()) {
      const observation: Observation = {
        id: input.ids?.[index] ?? uuidv7(),
        teamId: input.teamId,
        sessionId: input.sessionId,
        skaterId,
        cueId: input.cueId,
        mark: input.mark,
        note,
        noteShared: input.noteShared ?? false,
        createdAt,
        createdBy: input.userId,
        authorName: input.authorName ?? '',
      };
      const hlc = ctx.tick();
      const { id: _id, teamId: _team, ...fields } = observation;
      // The row carries its clock values from the start (no second statement to stamp them).
      const fieldHlc = Object.fromEntries(Object.keys(fields).map((field) => [field, hlc]));
      await insertRecord(ctx.db, 'observations', observation, fields, fieldHlc);
      await ctx.enqueue({ teamId: input.teamId, userId: input.userId, table: 'observations', recordId: observation.id, kind: 'upsert', fields, hlc });
      created.push(observation);
    }
    return created;
  });
}

/** A live observation, or StoreError (it was deleted, here or by a pull). */
async function observationRow(ctx: StoreContext, id: string): Promise<Observation> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${SELECT}, deleted FROM observations WHERE id = ?`, [id]);
  if (!row || row.deleted) throw new StoreError('That note no longer exists');
  return decodeRow<Observation>('observations', row);
}

function assertMayChange(row: Observation, userId: string, role: Role | undefined, what: 'change' | 'delete') {
  // A coach changes their own notes, the head coach any; without a role, only the author.
  if (!mayChangeNote(row, userId, role)) {
    throw new StoreError(`Only the coach who wrote this note or the head coach may ${what} it`);
  }
}

export async function updateObservation(ctx: StoreContext, id: string, userId: string, patch: ObservationPatch, role?: Role): Promise<Observation> {
  const changes = validate<ObservationPatch>(observationPatchSchema, patch);
  return ctx.tx(async () => {
    const row = await observationRow(ctx, id);
    assertMayChange(row, userId, role, 'change');
    const fields: Record<string, unknown> = {};
    for (const field of ['mark', 'note', 'noteShared'] as const) {
      if (changes[field] !== undefined && changes[field] !== row[field]) fields[field] = changes[field];
    }
    if (Object.keys(fields).length === 0) return row;
    await queueEdit(ctx, {
      teamId: row.teamId, userId, table: 'observations', recordId: id, fields,
      previous: Object.fromEntries(Object.keys(fields).map((f) => [f, row[f as keyof ObservationPatch]])),
    });
    return observationRow(ctx, id);
  });
}

/**
 * Removes observations (undo, or delete from the feed). One that never left the device simply
 * disappears with its outbox entries, so it never shows up anywhere; one the server may have
 * seen becomes a tombstone with a delete in the outbox.
 */
export async function removeObservations(ctx: StoreContext, ids: readonly string[], userId: string, role?: Role): Promise<void> {
  const { db } = ctx;
  await ctx.tx(async () => {
    for (const id of ids) {
      const row = await observationRow(ctx, id);
      assertMayChange(row, userId, role, 'delete');
      const [{ sent, synced }] = await db.all<{ sent: number; synced: number }>(
        `SELECT (SELECT count(*) FROM outbox WHERE tbl = 'observations' AND record_id = ? AND sent_at IS NOT NULL) AS sent,
                (SELECT synced FROM observations WHERE id = ?) AS synced`,
        [id, id],
      );
      if (sent === 0 && synced === 0) {
        ctx.assertWriter(userId);
        const mine = ctx.mine();
        await db.run(`DELETE FROM outbox WHERE tbl = 'observations' AND record_id = ?${mine.sql}`, [id, ...mine.params]);
        await db.run(`DELETE FROM sync_shadow WHERE tbl = 'observations' AND record_id = ?`, [id]);
        await db.run(`DELETE FROM observations WHERE id = ?`, [id]);
      } else {
        await db.run(`UPDATE observations SET deleted = 1 WHERE id = ?`, [id]);
        await ctx.enqueue({ teamId: row.teamId, userId, table: 'observations', recordId: id, kind: 'delete', fields: {}, hlc: ctx.tick() });
      }
    }
  });
}

/**
 * The skater says "got it": sets acknowledged_at and queues the change, in one transaction. A note
 * already acknowledged stays as it is (no second change is queued). A guardian reads along but
 * never acknowledges for the skater (the server refuses it too). Resolves to the acknowledgement time.
 */
export function acknowledgeObservation(ctx: StoreContext, id: string, userId: string, role?: Role): Promise<string> {
  if (role !== undefined && role !== 'skater') return Promise.reject(new StoreError('Only the skater can say they got a note'));
  return ctx.tx(async () => {
    const row = await observationRow(ctx, id);
    if (row.acknowledgedAt) return row.acknowledgedAt;
    const acknowledgedAt = new Date(ctx.now()).toISOString();
    await queueEdit(ctx, { teamId: row.teamId, userId, table: 'observations', recordId: id, fields: { acknowledgedAt }, previous: { acknowledgedAt: null } });
    return acknowledgedAt;
  });
}

/** The session's notes, newest first (tombstones excluded). */
export async function listObservations(ctx: StoreContext, sessionId: string): Promise<Observation[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `${SELECT} FROM observations WHERE session_id = ? AND deleted = 0 ORDER BY created_at DESC, id DESC`,
    [sessionId],
  );
  return rows.map((row) => decodeRow<Observation>('observations', row));
}

export async function countObservations(ctx: StoreContext, teamId: string): Promise<number> {
  const [{ n }] = await ctx.db.all<{ n: number }>(`SELECT count(*) AS n FROM observations WHERE team_id = ? AND deleted = 0`, [teamId]);
  return n;
}
