/**
 * Sessions: one per team and rink day, with the same id on every device (a UUID v5 of team and
 * day), so two coaches at the same rink write into one session without talking to each other.
 * A session joins the outbox with its first note or edit, never just because a board was opened.
 */
import { encodeHlc } from '../../shared/hlc';
import { boardSessionIdFor } from '../../shared/sync-tables';
import { boardSessionPatchSchema, type BoardSession, type BoardSessionPatch } from '../../shared/schemas';
import { decodeRow, insertRecord, selectColumns } from '../fields';
import { queueEdit, stampRow } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';

/** The local calendar day (YYYY-MM-DD) of a moment: sessions follow the rink's day, not UTC's. */
export function localDay(ms: number): string {
  const d = new Date(ms);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

/** The day's board session: the same id on every device and on the server (shared/sync-tables.ts). */
export const sessionIdFor = boardSessionIdFor;

const SESSION_SELECT = `SELECT id, team_id, ${selectColumns('sessions')} FROM sessions WHERE id = ?`;

export async function getSession(ctx: StoreContext, id: string): Promise<BoardSession | null> {
  const [row] = await ctx.db.all<Record<string, string>>(SESSION_SELECT, [id]);
  return row ? decodeRow<BoardSession>('sessions', row) : null;
}

/**
 * Today's session for the team: the same id on every device, created on first use. Opening the
 * board alone sends nothing: the session joins the outbox with its first note or edit.
 */
export async function startSession(ctx: StoreContext, teamId: string, userId: string, day: string): Promise<BoardSession> {
  ctx.assertWriter(userId);
  const id = sessionIdFor(teamId, day);
  const existing = await getSession(ctx, id);
  if (existing) return existing;
  return ctx.tx(async () => {
    const again = await getSession(ctx, id);
    if (again) return again;
    const createdAt = new Date(ctx.now()).toISOString();
    await insertRecord(ctx.db, 'sessions', { id, teamId }, { day, rink: '', title: '', focusCueIds: [], createdAt, createdBy: userId });
    return (await getSession(ctx, id))!;
  });
}

/**
 * Queues the whole session once, before the first change that depends on it. Another user's
 * parked create of the same session does not count: it is sent only when they come back.
 */
export async function ensureSessionQueued(ctx: StoreContext, session: BoardSession, userId: string): Promise<void> {
  const [{ queued }] = await ctx.db.all<{ queued: number }>(
    `SELECT (SELECT synced FROM sessions WHERE id = ?)
          + (SELECT count(*) FROM outbox WHERE tbl = 'sessions' AND record_id = ? AND user_id = ?) AS queued`,
    [session.id, session.id, userId],
  );
  if (queued > 0) return;
  const { id: _id, teamId: _team, ...fields } = session;
  // Every device creates the same session (one per team and day). Its starting values carry
  // the oldest possible clock, so they never overwrite a rink, title or focus another coach set.
  const fieldHlc = await ctx.enqueue({
    teamId: session.teamId,
    userId,
    table: 'sessions',
    recordId: session.id,
    kind: 'upsert',
    fields,
    hlc: encodeHlc({ wall: 0, counter: 0, node: ctx.deviceId }),
  });
  await stampRow(ctx.db, 'sessions', session.id, fieldHlc);
}

export async function updateSession(ctx: StoreContext, id: string, userId: string, patch: BoardSessionPatch): Promise<BoardSession> {
  const changes = validate<BoardSessionPatch>(boardSessionPatchSchema, patch);
  return ctx.tx(async () => {
    const session = await getSession(ctx, id);
    if (!session) throw new StoreError('That session no longer exists');
    await ensureSessionQueued(ctx, session, userId);
    const fields: Record<string, unknown> = {};
    if (changes.rink !== undefined && changes.rink !== session.rink) fields.rink = changes.rink;
    if (changes.title !== undefined && changes.title !== session.title) fields.title = changes.title;
    if (changes.focusCueIds !== undefined && JSON.stringify(changes.focusCueIds) !== JSON.stringify(session.focusCueIds)) {
      fields.focusCueIds = changes.focusCueIds;
    }
    if (Object.keys(fields).length > 0) {
      await queueEdit(ctx, {
        teamId: session.teamId, userId, table: 'sessions', recordId: id, fields,
        previous: Object.fromEntries(Object.keys(fields).map((f) => [f, session[f as keyof BoardSession]])),
      });
    }
    return (await getSession(ctx, id))!;
  });
}
