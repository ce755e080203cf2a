/**
 * GET /api/sync/pull: one page of changes and tombstones after the caller's cursor (shared/SYNC.md,
 * "Pull"), across every synced table (observations, sessions, cues, skaters, groups, and the
 * clock's runs, crossings and targets), in server_seq order.
 *
 *   Pull.1  a cursor older than the team's sync horizon (tombstones purged since) answers 410
 *           resync_required; cursor 0 is a full sync and is always valid.
 *   Pull.2  keyset read on (team_id, server_seq): each table gives at most `limit` rows after the
 *           cursor through its index, their merge is cut to `limit` in order. No OFFSET, so every
 *           page costs the same however deep the cursor is. Cursors compare with `>` only. Rows
 *           come back as plain columns; the fields are assembled here (cheaper than JSON in SQL).
 *   Pull.3  role filter inside the SQL: coaches get the team; a skater (or the guardian of one)
 *           gets only that skater's observations, with the note text blanked unless shared, their
 *           own profile and group, their own runs, the crossings of those runs and their own
 *           targets, and the team's sessions and cues.
 *   Pull.4  `remaining` counts what is left after this page with the same filter, in the same
 *           snapshot (REPEATABLE READ, read only) as the page itself; a short page leaves 0.
 *
 * Evictions: a note moved to another skater (tidy-up) is pulled by the skaters it belonged to
 * before (observations.former_skater_ids) as an eviction, and by its new skater as a change.
 * A skater or guardian sees only their skater's group. When their skater's profile
 * comes in a page (it changed: moved to another group, say), the page also carries the group they
 * are in now and evicts every other group from their device. A note made private arrives as a
 * change with its text blanked (the mark stays the skater's to see); a removed member gets 404.
 *
 * The columns and filters come from shared/sync-tables.ts.
 */
import type { DataSource } from 'typeorm';
import type { PullReply } from '../../../shared/schemas/sync';
import { fieldsOf, syncTableNames, tableSpec, type SyncTableName } from '../../../shared/sync-tables';
import { HttpError } from '../../lib/errors';
import { serverClock, serverNow } from './clock';
import type { Caller } from './settle';

const ts = (sql: string) => `to_char(${sql} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

type Row = Record<string, unknown>;

interface Source {
  table: SyncTableName;
  from: string;
  /** The columns `fields` reads, as plain SQL values (building JSON in SQL costs more than here). */
  columns: (coach: boolean) => string;
  /** The record's fields from the row. */
  fields: (row: Row) => Record<string, unknown>;
  /** Extra condition for a skater or guardian viewer ($4 is their skater id). */
  ownOnly?: string;
  /**
   * For a viewer of a table whose records move between skaters (`formerOwnersColumn`): the SQL
   * telling a row the viewer holds now from one that left them (pulled as an eviction).
   */
  ownedNow?: string;
}

/** One source per synced table, derived from its description in shared/sync-tables.ts. */
function sourceOf(table: SyncTableName): Source {
  const spec = tableSpec(table);
  const fields = fieldsOf(table);
  const alias = (name: string) => `f_${name.toLowerCase()}`;
  const columns = (coach: boolean) =>
    fields
      .map(([name, f]) => {
        const sql = (!coach && f.viewerRead) || f.read || f.column;
        return `${f.server === 'timestamptz' ? ts(sql) : sql} AS ${alias(name)}`;
      })
      .join(', ');
  const own = spec.viewerRows === 'team' ? undefined : spec.viewerRows.where.replace(/\$viewer/g, '$4');
  const former = spec.formerOwnersColumn;
  return {
    table,
    from: spec.serverTable,
    columns,
    fields: (row) => Object.fromEntries(fields.map(([name]) => [name, row[alias(name)]])),
    // A record that moved away from the viewer's skater still reaches them (as an eviction).
    ownOnly: own && former ? `(${own} OR ${former} @> jsonb_build_array($4::text))` : own,
    ownedNow: own && former ? own : undefined,
  };
}

const sources: Source[] = syncTableNames.map(sourceOf);
const groupsSource = sources.find((s) => s.table === 'groups')!;

/** $1 team, $2 cursor, $3 limit, $4 the viewer's skater id (skater and guardian variant only). */
function where(source: Source, coach: boolean) {
  return `team_id = $1 AND server_seq > $2${!coach && source.ownOnly ? ` AND ${source.ownOnly}` : ''}`;
}

/** One keyset read per table, each at most `limit` rows; readPull merges them and cuts to `limit`. */
function pageSql(coach: boolean) {
  return sources.map(
    (s) => `SELECT id, server_seq, deleted_at IS NOT NULL AS deleted, ${!coach && s.ownedNow ? `NOT (${s.ownedNow}) AS moved_away, ` : ''}${s.columns(coach)}
              FROM ${s.from} WHERE ${where(s, coach)} ORDER BY server_seq LIMIT $3`,
  );
}

function remainingSql(coach: boolean) {
  // No limit here: the viewer's skater id moves to $3.
  const cond = (s: Source) => where(s, coach).replace(/\$4/g, '$3');
  return `SELECT ${sources.map((s) => `(SELECT count(*) FROM ${s.from} WHERE ${cond(s)})`).join(' + ')} AS n`;
}

const coachSql = { page: pageSql(true), remaining: remainingSql(true) };
const skaterSql = { page: pageSql(false), remaining: remainingSql(false) };

interface PageRow {
  source: Source;
  row: Row & { id: string; deleted: boolean; moved_away?: boolean };
  serverSeq: number;
}

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
  let open = false;
  try {
    // One statement opens the read-only snapshot every query of this page sees (a page is a hot
    // path: each round trip to the database counts).
    await runner.query('BEGIN ISOLATION LEVEL REPEATABLE READ, READ ONLY');
    open = true;
    // Pull.1
    const [horizon] = (await runner.query(`SELECT horizon_seq FROM team_sync_horizons WHERE team_id = $1`, [teamId], true))
      .records as { horizon_seq: string }[];
    if (horizon && cursor > 0 && cursor < Number(horizon.horizon_seq)) {
      throw new HttpError(410, 'resync_required', 'This device has been away longer than deleted records are kept: sync from the start');
    }
    // Pull.2 + Pull.3: every table's next rows (same snapshot), merged in server order.
    let page: PageRow[] = [];
    for (const [i, pageSql] of sql.page.entries()) {
      const params = sources[i].ownOnly ? [teamId, cursor, limit, ...viewer] : [teamId, cursor, limit];
      const found = (await runner.query(pageSql, params, true)).records as PageRow['row'][];
      for (const row of found) page.push({ source: sources[i], row, serverSeq: Number(row.server_seq) });
    }
    page.sort((a, b) => a.serverSeq - b.serverSeq);
    const complete = page.length < limit;
    if (!complete) page = page.slice(0, limit);
    const nextCursor = page.length > 0 ? page[page.length - 1].serverSeq : cursor;
    // Pull.4 (a short page holds every row after the cursor: nothing remains).
    const n = complete
      ? 0
      : Number(((await runner.query(sql.remaining, [teamId, nextCursor, ...viewer], true)).records as { n: string }[])[0].n);
    // Evictions (Pull.3): a skater's own profile in this page may mean they moved group.
    let moved: { groups: { mine: boolean; row: PageRow['row'] }[] } | null = null;
    if (!coach && page.some((p) => p.source.table === 'skaters' && p.row.id === viewer[0])) {
      const groups = (
        await runner.query(
          `SELECT g.id, g.server_seq, g.deleted_at IS NOT NULL AS deleted, ${groupsSource.columns(true)},
                  g.id = (SELECT v.group_id FROM skaters v WHERE v.team_id = $1 AND v.id = $2) AS mine
             FROM skater_groups g WHERE g.team_id = $1 AND g.deleted_at IS NULL`,
          [teamId, viewer[0]],
          true,
        )
      ).records as (PageRow['row'] & { mine: boolean | null })[];
      moved = { groups: groups.map((row) => ({ mine: row.mine === true, row })) };
    }
    await runner.query('COMMIT');
    open = false;

    const reply: PullReply = {
      changes: [],
      tombstones: [],
      evictions: [],
      nextCursor,
      hasMore: Number(n) > 0,
      remaining: Number(n),
      serverClock: serverClock(teamId),
      serverTime: new Date(serverNow()).toISOString(),
    };
    for (const { source, row, serverSeq } of page) {
      // Moved to another skater (tidy-up): it leaves this viewer's device, whatever else changed.
      if (row.moved_away === true) reply.evictions.push({ table: source.table, id: row.id });
      else if (row.deleted) reply.tombstones.push({ table: source.table, id: row.id, serverSeq });
      else reply.changes.push({ table: source.table, id: row.id, serverSeq, fields: source.fields(row) });
    }
    if (moved) {
      // The viewer's skater changed (moved to another group, say): the group they are in now
      // comes again, and every other group leaves their device.
      const inPage = new Set(reply.changes.filter((c) => c.table === 'groups').map((c) => c.id));
      for (const group of moved.groups) {
        if (group.mine && !inPage.has(group.row.id)) reply.changes.push({ table: 'groups', id: group.row.id, serverSeq: Number(group.row.server_seq), fields: groupsSource.fields(group.row) });
        else if (!group.mine) reply.evictions.push({ table: 'groups', id: group.row.id });
      }
    }
    return reply;
  } catch (error) {
    if (open) await runner.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    await runner.release();
  }
}
