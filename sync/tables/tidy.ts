/**
 * Tidy-up (the evening review): the sessions the device holds, day by day, with their notes, and
 * the changes a coach makes to them after the ice: a note's mark, cue, text and shared switch, a
 * note moved to another skater, and two sessions of one day (or neighbouring days) merged into one
 * (the emptied one is left in place, never deleted). Every change is a
 * row write plus its outbox entry in ONE device transaction (a refusal half way leaves nothing
 * written), and goes to the server like the board's own edits.
 *
 * A note keeps its id when it moves (shared/sync-tables.ts, observations): session, skater and cue
 * are edited like mark and note, so the author and createdAt never change, and the server evicts
 * a moved note from the old skater's device.
 */
import { markSchema, noteSchema, type BoardSession, type Mark, type Observation, type Role } from '../../shared/schemas';
import { mayChangeNote } from '../../shared/authors';
import { fieldSpec } from '../../shared/sync-tables';
import type { SqlValue } from '../driver';
import { decodeRow, selectColumns } from '../fields';
import { queueEdit } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';
import { ensureSessionQueued, sessionIdFor } from './sessions';

/** What a tidy-up may change on one note. */
export interface NoteFix {
  mark?: Mark;
  cueId?: string;
  skaterId?: string;
  note?: string;
  noteShared?: boolean;
}

export interface TidySession extends BoardSession {
  /** The session the board writes into on that day (its id is derived from team and day). */
  boardSession: boolean;
  notes: Observation[];
}

/** A session may pin at most this many focus cues (shared/sync-tables.ts, sessions.focusCueIds). */
export const MAX_FOCUS_CUES = 6;

const OBS_SELECT = `SELECT id, team_id, ${selectColumns('observations')} FROM observations`;
const SESSION_SELECT = `SELECT id, team_id, ${selectColumns('sessions')} FROM sessions`;

/**
 * The team's sessions, newest day first (the most recently made first within a day), each with
 * its live notes, newest first. `days` bounds how many days come back (the most recent ones).
 */
export async function listTidySessions(ctx: StoreContext, teamId: string, days = 60): Promise<TidySession[]> {
  // Only sessions holding live notes: a board opened and never used, and a session emptied by a
  // merge (never deleted, see mergeSessions), are not listed; a note arriving later in the
  // emptied one lists it again.
  const used = `deleted = 0 AND EXISTS (SELECT 1 FROM observations o WHERE o.session_id = sessions.id AND o.deleted = 0)`;
  const sessionRows = await ctx.db.all<Record<string, SqlValue>>(
    `${SESSION_SELECT} WHERE team_id = ? AND ${used}
       AND day IN (SELECT DISTINCT day FROM sessions WHERE team_id = ? AND ${used} ORDER BY day DESC LIMIT ?)
     ORDER BY day DESC, created_at DESC, id`,
    [teamId, teamId, days],
  );
  if (sessionRows.length === 0) return [];
  const sessions = sessionRows.map((row) => decodeRow<BoardSession>('sessions', row));
  const noteRows = await ctx.db.all<Record<string, SqlValue>>(
    `${OBS_SELECT} WHERE deleted = 0 AND session_id IN (SELECT value FROM json_each(?)) ORDER BY created_at DESC, id DESC`,
    [JSON.stringify(sessions.map((s) => s.id))],
  );
  const bySession = new Map<string, Observation[]>(sessions.map((s) => [s.id, []]));
  for (const row of noteRows) {
    const note = decodeRow<Observation>('observations', row);
    bySession.get(note.sessionId)?.push(note);
  }
  return sessions.map((s) => ({ ...s, boardSession: s.id === sessionIdFor(teamId, s.day), notes: bySession.get(s.id) ?? [] }));
}

async function liveNote(ctx: StoreContext, id: string): Promise<Observation> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${OBS_SELECT} WHERE id = ? AND deleted = 0`, [id]);
  if (!row) throw new StoreError('That note no longer exists');
  return decodeRow<Observation>('observations', row);
}

async function liveSession(ctx: StoreContext, id: string): Promise<BoardSession | null> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${SESSION_SELECT} WHERE id = ? AND deleted = 0`, [id]);
  return row ? decodeRow<BoardSession>('sessions', row) : null;
}

const uuidRule = (field: 'cueId' | 'skaterId' | 'sessionId') => fieldSpec('observations', field)!.rule!;

/**
 * Fixes one note: mark, cue, text, shared switch, or the skater it is about. The new skater and
 * cue must be held on this device for the note's team (a skater of another team is refused, like
 * the server refuses it); moving to another skater clears the old skater's acknowledgement.
 */
export async function fixNote(ctx: StoreContext, id: string, userId: string, fix: NoteFix, role?: Role): Promise<Observation> {
  const changes: NoteFix = {};
  if (fix.mark !== undefined) changes.mark = validate<Mark>(markSchema, fix.mark);
  if (fix.note !== undefined) changes.note = validate<string>(noteSchema, fix.note);
  if (fix.noteShared !== undefined) {
    if (typeof fix.noteShared !== 'boolean') throw new StoreError('noteShared must be true or false');
    changes.noteShared = fix.noteShared;
  }
  if (fix.cueId !== undefined) changes.cueId = validate<string>(uuidRule('cueId'), fix.cueId);
  if (fix.skaterId !== undefined) changes.skaterId = validate<string>(uuidRule('skaterId'), fix.skaterId);
  return ctx.tx(async () => {
    const row = await liveNote(ctx, id);
    if (!mayChangeNote(row, userId, role)) throw new StoreError('Only the coach who wrote this note or the head coach may change it');
    if (changes.cueId !== undefined && changes.cueId !== row.cueId) {
      const [cue] = await ctx.db.all<{ archived: number }>(`SELECT archived FROM cues WHERE id = ? AND team_id = ?`, [changes.cueId, row.teamId]);
      if (!cue) throw new StoreError('That cue is not in this team\'s library');
    }
    if (changes.skaterId !== undefined && changes.skaterId !== row.skaterId) {
      const [skater] = await ctx.db.all<{ id: string }>(`SELECT id FROM skaters WHERE id = ? AND team_id = ?`, [changes.skaterId, row.teamId]);
      if (!skater) throw new StoreError('That skater is not in this team');
    }
    const fields: Record<string, unknown> = {};
    for (const field of ['mark', 'cueId', 'skaterId', 'note', 'noteShared'] as const) {
      if (changes[field] !== undefined && changes[field] !== row[field]) fields[field] = changes[field];
    }
    if (Object.keys(fields).length === 0) return row;
    await queueEdit(ctx, {
      teamId: row.teamId, userId, table: 'observations', recordId: id, fields,
      previous: Object.fromEntries(Object.keys(fields).map((f) => [f, row[f as keyof Observation]])),
    });
    // The old skater's "got it" is not the new skater's: the server clears it too (settle.ts).
    if (fields.skaterId !== undefined) await ctx.db.run(`UPDATE observations SET acknowledged_at = NULL WHERE id = ?`, [id]);
    return liveNote(ctx, id);
  });
}

/** Two days (YYYY-MM-DD) apart by exactly one calendar day. */
function neighbouringDays(a: string, b: string): boolean {
  const ms = (day: string) => Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 1, Number(day.slice(8, 10)));
  return Math.abs(ms(a) - ms(b)) === 86_400_000;
}

type MergeSide = Pick<TidySession, 'id' | 'day' | 'createdAt' | 'boardSession'>;

/**
 * Which of two sessions a merge keeps (the other is emptied): the board's session of its day
 * (every device writes there), else the earlier day (a session that ran past midnight on one
 * device), else the one made first. Pure: the UI says which before the coach confirms.
 */
export function mergeKeeps<T extends MergeSide>(a: T, b: T): { kept: T; emptied: T } {
  const order = (x: MergeSide, y: MergeSide) =>
    Number(y.boardSession) - Number(x.boardSession) || x.day.localeCompare(y.day) || x.createdAt.localeCompare(y.createdAt) || x.id.localeCompare(y.id);
  return order(a, b) <= 0 ? { kept: a, emptied: b } : { kept: b, emptied: a };
}

/** Which two sessions may be merged: the same day or neighbouring days, never one with itself. */
export function mayMergeSessions(a: Pick<TidySession, 'id' | 'day'>, b: Pick<TidySession, 'id' | 'day'>): boolean {
  return a.id !== b.id && (a.day === b.day || neighbouringDays(a.day, b.day));
}

/**
 * Merges two sessions of one day or of neighbouring days: every note of the emptied one moves to
 * the kept one (`mergeKeeps`) and the focus cues are united (at most six; the kept session's own
 * first). The emptied session is NOT deleted: a day's board session has an id derived from team
 * and day, and its tombstone would refuse that day's board on every device for good (the server
 * refuses such a delete, shared/sync-tables.ts `deleteGuard`). Left empty, it is hidden by
 * listTidySessions, and listed again if a note arrives in it later (a device that had not synced
 * yet): the note is never lost. A plain coach may merge only when every moving note is theirs
 * (the head coach any). One device transaction: all of it or nothing.
 */
export function mergeSessions(
  ctx: StoreContext,
  teamId: string,
  userId: string,
  aId: string,
  bId: string,
  role?: Role,
): Promise<{ kept: string; removed: string; moved: number }> {
  if (aId === bId) return Promise.reject(new StoreError('A session cannot be merged into itself'));
  return ctx.tx(async () => {
    const a = await liveSession(ctx, aId);
    const b = await liveSession(ctx, bId);
    if (!a || !b || a.teamId !== teamId || b.teamId !== teamId) throw new StoreError('That session no longer exists');
    if (!mayMergeSessions(a, b)) throw new StoreError('Only two sessions of the same day or of neighbouring days can be merged');
    const side = (s: BoardSession) => ({ id: s.id, day: s.day, createdAt: s.createdAt, boardSession: s.id === sessionIdFor(teamId, s.day) });
    const [kept, removed] = mergeKeeps(side(a), side(b)).kept.id === a.id ? [a, b] : [b, a];
    const moving = (
      await ctx.db.all<Record<string, SqlValue>>(`${OBS_SELECT} WHERE session_id = ? AND deleted = 0 ORDER BY created_at, id`, [removed.id])
    ).map((row) => decodeRow<Observation>('observations', row));
    const others = moving.filter((note) => !mayChangeNote(note, userId, role));
    if (others.length > 0) {
      throw new StoreError(`Only the head coach may merge these sessions: ${others.length} of the notes were written by another coach`);
    }
    // The kept session must reach the server before the notes that move into it.
    await ensureSessionQueued(ctx, kept, userId);
    ctx.sessionsQueued.add(kept.id);
    for (const note of moving) {
      await queueEdit(ctx, { teamId, userId, table: 'observations', recordId: note.id, fields: { sessionId: kept.id }, previous: { sessionId: note.sessionId } });
    }
    const focus = [...new Set([...kept.focusCueIds, ...removed.focusCueIds])].slice(0, MAX_FOCUS_CUES);
    if (JSON.stringify(focus) !== JSON.stringify(kept.focusCueIds)) {
      await queueEdit(ctx, { teamId, userId, table: 'sessions', recordId: kept.id, fields: { focusCueIds: focus }, previous: { focusCueIds: kept.focusCueIds } });
    }
    return { kept: kept.id, removed: removed.id, moved: moving.length };
  });
}

