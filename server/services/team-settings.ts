/**
 * The team's settings the head coach decides (teams columns): whether a note written at the
 * boards is shared with its skater by default, and the time zone the review counts weeks and days
 * in. Reads and writes are bounded by the team id.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { TeamSettings, TeamSettingsPatch } from '../../shared/schemas';
import { badRequest, notFound } from '../lib/errors';

export async function readTeamSettings(dataSource: DataSource, teamId: string): Promise<TeamSettings> {
  const [row]: { share_board_notes: boolean; time_zone: string }[] = await dataSource.query(
    `SELECT share_board_notes, time_zone FROM teams WHERE id = $1`,
    [teamId],
  );
  if (!row) throw notFound('Team not found');
  return { shareBoardNotes: row.share_board_notes, timeZone: row.time_zone };
}

/**
 * Whether PostgreSQL can count in this zone (teams' CHECK asks the same). The schema has checked
 * the name with Intl already; the two zone lists can differ by a release of the time zone data.
 */
export async function isKnownTimeZone(db: DataSource | EntityManager, name: string): Promise<boolean> {
  const [row]: { known: boolean }[] = await db.query(`SELECT is_known_time_zone($1) AS known`, [name]);
  return row.known === true;
}

export async function updateTeamSettings(dataSource: DataSource, teamId: string, patch: TeamSettingsPatch): Promise<TeamSettings> {
  if (patch.timeZone !== undefined && !(await isKnownTimeZone(dataSource, patch.timeZone))) {
    const message = `The server's time zone list does not have ${patch.timeZone}: pick a nearby city's zone`;
    throw badRequest(message, { timeZone: message });
  }
  if (patch.shareBoardNotes !== undefined || patch.timeZone !== undefined) {
    await dataSource.query(
      `UPDATE teams SET share_board_notes = coalesce($2, share_board_notes), time_zone = coalesce($3, time_zone) WHERE id = $1`,
      [teamId, patch.shareBoardNotes ?? null, patch.timeZone ?? null],
    );
  }
  return readTeamSettings(dataSource, teamId);
}
