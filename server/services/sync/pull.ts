/**
 * GET /api/sync/pull: one page of changes and tombstones after the caller's cursor (shared/SYNC.md,
 * "Pull"), across observations, sessions, cues, skaters and groups, in server_seq order.
 *
 *   Pull.1  a cursor older than the team's sync horizon (tombstones purged since) answers 410
 *           resync_required; cursor 0 is a full sync and is always valid.
 *   Pull.2  keyset read on (team_id, server_seq): each table gives at most `limit` rows after the
 *           cursor through its index, the union is cut to `limit` in order. No OFFSET, so every
 *           page costs the same however deep the cursor is. Cursors compare with `>` only.
 *   Pull.3  role filter inside the SQL: coaches get the team; a skater (or the guardian of one)
 *           gets only that skater's observations, with the note text blanked unless shared, their
 *           own profile, and the team's sessions, cues and groups.
 *   Pull.4  `remaining` counts what is left after this page with the same filter, in the same
 *           snapshot (REPEATABLE READ, read only) as the page itself.
 *
 * Evictions: nothing in today's model makes a visible record invisible to a member (a note made
 * private arrives as a change with the text blanked; a removed member gets 404), so the list is
 * empty. It is kept in the reply for when such a rule appears.
 */
import type { DataSource } from 'typeorm';
import type { PullReply, PullTable } from '../../../shared/schemas/sync';
import { HttpError } from '../../lib/errors';
import { serverClock, serverNow } from './clock';
import type { Caller } from './push';

const ts = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

interface Source {
  table: PullTable;
  from: string;
  fields: (coach: boolean) => string;
  /** Extra condition for a skater or guardian viewer ($4 is their skater id). */
  ownOnly?: string;
}

const sources: Source[] = [
  {
    table: 'observations',
    from: 'observations',
    fields: (coach) => `jsonb_build_object(
      'sessionId', session_id, 'skaterId', skater_id, 'cueId', cue_id, 'mark', mark,
      'note', ${coach ? 'note' : `CASE WHEN note_shared THEN note ELSE '' END`}, 'noteShared', note_shared,
      'createdAt', ${ts('created_at')}, 'createdBy', created_by, 'acknowledgedAt', ${ts('acknowledged_at')})`,
    ownOnly: 'skater_id = $4',
  },
  {
    table: 'sessions',
    from: 'sessions',
    fields: () => `jsonb_build_object('day', day, 'rink', rink, 'title', title, 'focusCueIds', focus_cue_ids,
      'createdAt', ${ts('created_at')}, 'createdBy', created_by)`,
  },
  {
    table: 'cues',
    from: 'cues',
    fields: () => `jsonb_build_object('phase', phase, 'label', label, 'sortOrder', sort_order, 'archived', archived_at IS NOT NULL)`,
  },
  {
    table: 'skaters',
    from: 'skaters',
    fields: () => `jsonb_build_object('displayName', display_name, 'groupId', group_id, 'hasAccount', user_id IS NOT NULL)`,
    ownOnly: 'id = $4',
  },
  {
    table: 'groups',
    from: 'skater_groups',
    fields: () => `jsonb_build_object('name', name, 'sortOrder', sort_order)`,
  },
];

/** $1 team, $2 cursor, $3 limit, $4 the viewer's skater id (skater and guardian variant only). */
function where(source: Source, coach: boolean) {
  return `team_id = $1 AND server_seq > $2${!coach && source.ownOnly ? ` AND ${source.ownOnly}` : ''}`;
}

function pageSql(coach: boolean) {
  const parts = sources.map(
    (s) => `(SELECT '${s.table}' AS tbl, id, server_seq, deleted_at IS NOT NULL AS deleted,
                    CASE WHEN deleted_at IS NULL THEN ${s.fields(coach)} END AS fields
               FROM ${s.from} WHERE ${where(s, coach)} ORDER BY server_seq LIMIT $3)`,
  );
  return `SELECT * FROM (${parts.join('\nUNION ALL\n')}) page ORDER BY server_seq LIMIT $3`;
}

function remainingSql(coach: boolean) {
  // No limit here: the viewer's skater id moves to $3.
  const cond = (s: Source) => where(s, coach).replace('$4', '$3');
  return `SELECT ${sources.map((s) => `(SELECT count(*) FROM ${s.from} WHERE ${cond(s)})`).join(' + ')} AS n`;
}

const coachSql = { page: pageSql(true), remaining: remainingSql(true) };
const skaterSql = { page: pageSql(false), remaining: remainingSql(false) };

export async function readPull(
  dataSource: DataSource,
  caller: Caller,
  teamId: string,
  cursor: number,
  limit: number,
): Promise<PullReply> {
  const coach = caller.role === 'head_coach' || caller.role === 'coach';
  const sql = coach ? coachSql : skaterSql;
  // A skater or guardian without a linked skater sees no observations and no profile.
  const viewer = coach ? [] : [caller.skaterId ?? '00000000-0000-0000-0000-000000000000'];
  const runner = dataSource.createQueryRunner('slave');
  await runner.connect();
  try {
    await runner.startTransaction('REPEATABLE READ');
    await runner.query('SET TRANSACTION READ ONLY');
    // Pull.1
    const [horizon] = (await runner.query(`SELECT horizon_seq FROM team_sync_horizons WHERE team_id = $1`, [teamId], true))
      .records as { horizon_seq: string }[];
    if (horizon && cursor > 0 && cursor < Number(horizon.horizon_seq)) {
      throw new HttpError(410, 'resync_required', 'This device has been away longer than deleted records are kept: sync from the start');
    }
    // Pull.2 + Pull.3
    const page = (await runner.query(sql.page, [teamId, cursor, limit, ...viewer], true)).records as {
      tbl: PullTable;
      id: string;
      server_seq: string;
      deleted: boolean;
      fields: Record<string, unknown> | null;
    }[];
    const nextCursor = page.length > 0 ? Number(page[page.length - 1].server_seq) : cursor;
    // Pull.4
    const [{ n }] = (await runner.query(sql.remaining, [teamId, nextCursor, ...viewer], true)).records as { n: string }[];
    await runner.commitTransaction();

    const reply: PullReply = {
      changes: [],
      tombstones: [],
      evictions: [],
      nextCursor,
      hasMore: Number(n) > 0,
      remaining: Number(n),
      serverClock: serverClock(),
      serverTime: new Date(serverNow()).toISOString(),
    };
    for (const row of page) {
      const serverSeq = Number(row.server_seq);
      if (row.deleted) reply.tombstones.push({ table: row.tbl, id: row.id, serverSeq });
      else reply.changes.push({ table: row.tbl, id: row.id, serverSeq, fields: row.fields! });
    }
    return reply;
  } catch (error) {
    if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
    throw error;
  } finally {
    await runner.release();
  }
}
