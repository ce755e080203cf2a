/**
 * SQL fragments every review statement shares, written once (queries.ts, export.ts, laps.ts,
 * follow-up.ts). Each is a string spliced into a statement; none takes user input (values travel
 * as $n parameters).
 */
import type { ReviewGroup } from '../../../shared/schemas/review';

/** to_char's format for an ISO week, "2026-W07" (quoted, ready to splice). */
export const WEEK = `'IYYY-"W"IW'`;

/** Local midnight of a day ($n::date) in the zone ($2) as an instant. */
export const localMidnight = (param: string) => `(${param}::date::timestamp AT TIME ZONE $2)`;

/**
 * Live (not retired, not deleted) skaters of a group the review sums over ('all': the team;
 * 'none': in no group); $1 team, $2 group id or null (param is what to pass as $2).
 */
export function groupMembers(group: ReviewGroup): { sql: string; param: string | null } {
  const base = `SELECT s.id, s.display_name FROM skaters s WHERE s.team_id = $1 AND s.deleted_at IS NULL AND s.retired_at IS NULL`;
  if (group === 'all') return { sql: `${base} AND $2::uuid IS NULL`, param: null };
  if (group === 'none') return { sql: `${base} AND s.group_id IS NULL AND $2::uuid IS NULL`, param: null };
  return { sql: `${base} AND s.group_id = $2::uuid`, param: group };
}
