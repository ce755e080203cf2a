/**
 * The squad as the device holds it: groups and skaters (read-only here: they come from the server,
 * by pull or by a reload of the team), and the reload itself, which also brings the cue library.
 * Retired skaters stay on the device (their notes keep their name) but are not on the board.
 */
import type { Cue, Group, Skater } from '../../shared/schemas';
import type { SqlValue } from '../driver';
import { decodeRow, encodeFields, insertRecord, selectColumns } from '../fields';
import type { StoreContext } from '../store-context';

/**
 * Loads the team's squad and cue library as read from the server. Cues with local edits still
 * waiting in the outbox keep their local values.
 */
export function loadTeam(ctx: StoreContext, teamId: string, data: { groups: Group[]; skaters: Skater[]; cues: Cue[] }): Promise<void> {
  const { db } = ctx;
  return ctx.tx(async () => {
    await db.run(`DELETE FROM groups WHERE team_id = ?`, [teamId]);
    for (const { id, ...fields } of data.groups) await insertRecord(db, 'groups', { id, teamId }, fields);
    await db.run(`DELETE FROM skaters WHERE team_id = ?`, [teamId]);
    for (const { id, ...fields } of data.skaters) await insertRecord(db, 'skaters', { id, teamId }, fields);
    for (const { id, ...fields } of data.cues) {
      const { columns, values } = encodeFields('cues', fields);
      await db.run(
        `INSERT INTO cues (id, team_id, ${columns.join(', ')}, synced) VALUES (?, ?, ${columns.map(() => '?').join(', ')}, 1)
         ON CONFLICT (id) DO UPDATE SET ${columns.map((c) => `${c} = excluded.${c}`).join(', ')}, synced = 1
         WHERE NOT EXISTS (SELECT 1 FROM outbox WHERE tbl = 'cues' AND record_id = excluded.id)`,
        [id, teamId, ...values],
      );
    }
  });
}

export async function listGroups(ctx: StoreContext, teamId: string): Promise<Group[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `SELECT id, ${selectColumns('groups')} FROM groups WHERE team_id = ? ORDER BY sort_order, name`,
    [teamId],
  );
  return rows.map((row) => decodeRow<Group>('groups', row));
}

/** Which skaters a list holds: everyone (names in history: feeds, the today page) or only those on the board. */
export interface SkaterListOptions {
  /** Only skaters who are not retired: the board's tiles and pickers. */
  onBoard?: boolean;
}

export async function listSkaters(ctx: StoreContext, teamId: string, options: SkaterListOptions = {}): Promise<Skater[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `SELECT id, ${selectColumns('skaters')} FROM skaters WHERE team_id = ?${options.onBoard ? ' AND retired = 0' : ''} ORDER BY display_name`,
    [teamId],
  );
  return rows.map((row) => decodeRow<Skater>('skaters', row));
}
