/**
 * Who may see which skater's review (issue #10 §6), and the team's time zone. Head coach and
 * coaches: every skater of the team. A skater: their own profile only; a guardian: the linked
 * skater's. Any other id, and any id of another team, looks absent (404), like the squad routes.
 * The group and one-week views are for coaches only (the route's guard answers 403).
 */
import type { DataSource } from 'typeorm';
import { isCoachRole } from '../../../shared/schemas';
import type { Membership } from '../../entities';
import { notFound } from '../../lib/errors';

export interface Viewer {
  teamId: string;
  coach: boolean;
  /** The skater a skater or guardian is linked to. */
  skaterId: string | null;
}

export const viewerOf = (membership: Membership): Viewer => ({
  teamId: membership.teamId,
  coach: isCoachRole(membership.role),
  skaterId: isCoachRole(membership.role) ? null : membership.skaterId,
});

/** The team's time zone (teams.time_zone, an IANA name PostgreSQL knows). */
export async function teamTimeZone(dataSource: DataSource, teamId: string): Promise<string> {
  const [row]: { time_zone: string }[] = await dataSource.query(`SELECT time_zone FROM teams WHERE id = $1`, [teamId]);
  if (!row) throw notFound('Team not found');
  return row.time_zone;
}

/** Checks the viewer may read this skater's review and that the skater exists in the team (retired ones too). */
export async function assertSkaterVisible(dataSource: DataSource, viewer: Viewer, skaterId: string): Promise<void> {
  if (!viewer.coach && skaterId !== viewer.skaterId) throw notFound('No such skater in this team');
  const found: unknown[] = await dataSource.query(`SELECT 1 FROM skaters WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL`, [
    viewer.teamId,
    skaterId,
  ]);
  if (found.length === 0) throw notFound('No such skater in this team');
}

/** Checks a group id names a live group of the team ('all' and 'none' always do). */
export async function assertGroupExists(dataSource: DataSource, teamId: string, groupId: string): Promise<void> {
  if (groupId === 'all' || groupId === 'none') return;
  const found: unknown[] = await dataSource.query(`SELECT 1 FROM skater_groups WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL`, [
    teamId,
    groupId,
  ]);
  if (found.length === 0) throw notFound('No such group in this team');
}
