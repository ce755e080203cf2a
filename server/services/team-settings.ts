/**
 * The team's settings the head coach decides (teams columns): today whether a note written at the
 * boards is shared with its skater by default. Reads and writes are bounded by the team id.
 */
import type { DataSource } from 'typeorm';
import type { TeamSettings, TeamSettingsPatch } from '../../shared/schemas';
import { notFound } from '../lib/errors';

export async function readTeamSettings(dataSource: DataSource, teamId: string): Promise<TeamSettings> {
  const [row]: { share_board_notes: boolean }[] = await dataSource.query(`SELECT share_board_notes FROM teams WHERE id = $1`, [teamId]);
  if (!row) throw notFound('Team not found');
  return { shareBoardNotes: row.share_board_notes };
}

export async function updateTeamSettings(dataSource: DataSource, teamId: string, patch: TeamSettingsPatch): Promise<TeamSettings> {
  if (patch.shareBoardNotes !== undefined) {
    await dataSource.query(`UPDATE teams SET share_board_notes = $2 WHERE id = $1`, [teamId, patch.shareBoardNotes]);
  }
  return readTeamSettings(dataSource, teamId);
}
