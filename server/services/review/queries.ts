/**
 * The review's counts, each view one SQL statement that groups in PostgreSQL (no counting of
 * single notes here). A skater's matrix and the one-week grid sum observation_week_counts (the
 * live notes counted per team, local Monday, skater and cue, kept exact by triggers on
 * observations and recounted when the team's zone changes: migration 1764785000000); a group's
 * matrix sums observation_group_week_counts (the same per group of live skaters, kept from it:
 * 1764786000000), so a group's year is about 1,600 rows instead of 500,000 notes each turned into
 * a local week. A week's Monday is date_trunc('week', created_at AT TIME ZONE zone), so its label
 * to_char(monday, 'IYYY-"W"IW') is the note's own ISO week, and a range of weeks is a range of
 * Mondays [Monday of `from`, Monday after `to`). A cell's notes are read from observations over
 * ix_observations_review_skater, the range [Monday of `from`, Monday after `to`) at local midnight.
 * Deleted notes (tombstones, deleted_at set) never count; notes of a deleted cue are left out
 * with it (archived cues stay, flagged). Every statement is bounded by the caller's team; lists
 * travel as arrays (one parameter), never as one parameter per item.
 */
import type { DataSource } from 'typeorm';
import { phases, type Phase } from '../../../shared/cues';
import type { ReviewCell, ReviewCue, ReviewGroup, ReviewMatrix, ReviewRow, ReviewWeek } from '../../../shared/schemas/review';
import { trendOf } from './trend';
import type { Viewer } from './access';
import type { WeekRange } from './range';
import { groupMembers, localMidnight, WEEK } from './sql';

interface MatrixRow {
  cue_id: string;
  phase: Phase;
  label: string;
  archived: boolean;
  week: string;
  needs_work: number;
  good: number;
  total_needs_work: number;
  total_good: number;
}

/**
 * $1 team, $2 skater id or group key, $3 first Monday, $4 Monday after the range, $5 the phases in
 * display order. `counts` is the kept table read (a skater's or a group's), `who` selects its rows.
 * The counts are kept in the team's zone, which the statement needs no more.
 */
const matrixSql = (counts: string, who: string) => `
  WITH cells AS MATERIALIZED (
    SELECT w.cue_id, w.week_start,
           sum(w.needs_work)::int AS needs_work,
           sum(w.good)::int AS good
      FROM ${counts} w
     WHERE w.team_id = $1 AND w.week_start >= $3::date AND w.week_start < $4::date
       AND ${who}
     GROUP BY 1, 2
    HAVING sum(w.needs_work) + sum(w.good) > 0
  )
  SELECT c.id AS cue_id, c.phase, c.label, c.archived, to_char(cells.week_start, ${WEEK}) AS week, cells.needs_work, cells.good,
         (sum(cells.needs_work) OVER (PARTITION BY c.id))::int AS total_needs_work,
         (sum(cells.good) OVER (PARTITION BY c.id))::int AS total_good
    FROM cells
    JOIN cues c ON c.team_id = $1 AND c.id = cells.cue_id AND c.deleted_at IS NULL
   ORDER BY array_position($5::text[], c.phase), c.sort_order, c.label, c.id, cells.week_start`;

function toMatrix(rows: MatrixRow[], range: WeekRange, timeZone: string): ReviewMatrix {
  const out: ReviewRow[] = [];
  for (const row of rows) {
    let last = out[out.length - 1];
    if (!last || last.cueId !== row.cue_id) {
      last = {
        cueId: row.cue_id,
        phase: row.phase,
        label: row.label,
        archived: row.archived,
        counts: [],
        totalNeedsWork: row.total_needs_work,
        totalGood: row.total_good,
        trend: 'not enough data',
      };
      out.push(last);
    }
    last.counts.push({ week: row.week, needsWork: row.needs_work, good: row.good });
  }
  for (const row of out) row.trend = trendOf(range.weeks, row.counts);
  return { timeZone, from: range.from, to: range.to, weeks: range.weeks, rows: out };
}

/** One skater's cues x weeks (the caller has checked the viewer may see this skater). */
export async function skaterMatrix(dataSource: DataSource, teamId: string, timeZone: string, skaterId: string, range: WeekRange) {
  const rows: MatrixRow[] = await dataSource.query(matrixSql('observation_week_counts', `w.skater_id = $2::uuid`), [
    teamId,
    skaterId,
    range.startDay,
    range.endDay,
    phases,
  ]);
  return toMatrix(rows, range, timeZone);
}

/** observation_group_week_counts' key for the skaters in no group (migration 1764786000000). */
const NO_GROUP = '00000000-0000-0000-0000-000000000000';

/**
 * The same matrix summed over a group's live skaters ('all': the team; 'none': skaters in no
 * group), from the counts kept per group of live skaters (observation_group_week_counts): the
 * whole team is the sum over its groups.
 */
export async function groupMatrix(dataSource: DataSource, teamId: string, timeZone: string, group: ReviewGroup, range: WeekRange) {
  const who = group === 'all' ? `$2::uuid IS NULL` : `w.group_key = $2::uuid`;
  const rows: MatrixRow[] = await dataSource.query(matrixSql('observation_group_week_counts', who), [
    teamId,
    group === 'all' ? null : group === 'none' ? NO_GROUP : group,
    range.startDay,
    range.endDay,
    phases,
  ]);
  return toMatrix(rows, range, timeZone);
}

interface WeekRow {
  skater_id: string;
  display_name: string;
  cue_id: string | null;
  phase: Phase | null;
  label: string | null;
  archived: boolean | null;
  sort_order: number | null;
  needs_work: number | null;
  good: number | null;
}

/** Skaters x cues for one week: every live skater of the group, the cues marked that week, the non-empty cells. */
export async function weekGrid(dataSource: DataSource, teamId: string, timeZone: string, group: ReviewGroup, range: WeekRange): Promise<ReviewWeek> {
  const members = groupMembers(group);
  const rows: WeekRow[] = await dataSource.query(
    `WITH members AS (${members.sql}),
     cells AS MATERIALIZED (
       SELECT x.skater_id, c.id AS cue_id, c.phase, c.label, c.archived, c.sort_order, x.needs_work, x.good
         FROM (SELECT w.skater_id, w.cue_id, sum(w.needs_work)::int AS needs_work, sum(w.good)::int AS good
                 FROM observation_week_counts w
                WHERE w.team_id = $1 AND w.week_start >= $3::date AND w.week_start < $4::date
                  AND w.skater_id IN (SELECT id FROM members)
                GROUP BY 1, 2
               HAVING sum(w.needs_work) + sum(w.good) > 0) x
         JOIN cues c ON c.team_id = $1 AND c.id = x.cue_id AND c.deleted_at IS NULL
     )
     SELECT m.id AS skater_id, m.display_name, x.cue_id, x.phase, x.label, x.archived, x.sort_order, x.needs_work, x.good
       FROM members m
       LEFT JOIN cells x ON x.skater_id = m.id
      ORDER BY m.display_name COLLATE "und-x-icu", m.id`,
    [teamId, members.param, range.startDay, range.endDay],
  );
  const skaters: ReviewWeek['skaters'] = [];
  const cues = new Map<string, ReviewCue & { sortOrder: number }>();
  const cells: ReviewWeek['cells'] = [];
  for (const row of rows) {
    if (skaters[skaters.length - 1]?.id !== row.skater_id) skaters.push({ id: row.skater_id, displayName: row.display_name });
    if (row.cue_id === null) continue;
    if (!cues.has(row.cue_id)) {
      cues.set(row.cue_id, { cueId: row.cue_id, phase: row.phase!, label: row.label!, archived: row.archived!, sortOrder: row.sort_order! });
    }
    cells.push({ skaterId: row.skater_id, cueId: row.cue_id, needsWork: row.needs_work!, good: row.good! });
  }
  const ordered = [...cues.values()]
    .sort((a, b) => phases.indexOf(a.phase) - phases.indexOf(b.phase) || a.sortOrder - b.sortOrder || a.label.localeCompare(b.label))
    .map(({ sortOrder: _sortOrder, ...cue }) => cue);
  return { timeZone, week: range.from, skaters, cues: ordered, cells };
}

/** Most notes a cell answers with (one skater, one cue, one week: far more than a coach makes). */
export const CELL_NOTES_LIMIT = 500;

/** The notes behind one cell, newest first; a skater or guardian reads a note's text only when shared. */
export async function cellNotes(
  dataSource: DataSource,
  viewer: Viewer,
  timeZone: string,
  skaterId: string,
  cueId: string,
  range: WeekRange,
): Promise<ReviewCell> {
  const rows: {
    id: string;
    created_at: string;
    day: string;
    author_name: string;
    created_by: string | null;
    mark: 'needs_work' | 'good';
    note: string;
    note_shared: boolean;
    session_id: string;
  }[] = await dataSource.query(
    `SELECT o.id,
            to_char(o.created_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') AS created_at,
            to_char(o.created_at AT TIME ZONE $2, 'YYYY-MM-DD') AS day,
            coalesce(nullif(o.author_name, ''), u.display_name, '') AS author_name,
            CASE WHEN $7 THEN o.created_by::text ELSE '' END AS created_by,
            o.mark,
            CASE WHEN $7 OR o.note_shared THEN o.note ELSE '' END AS note,
            o.note_shared, o.session_id
       FROM observations o
       LEFT JOIN users u ON u.id = o.created_by
      WHERE o.team_id = $1 AND o.skater_id = $3 AND o.cue_id = $6 AND o.deleted_at IS NULL
        AND o.created_at >= ${localMidnight('$4')} AND o.created_at < ${localMidnight('$5')}
      ORDER BY o.created_at DESC, o.id DESC
      LIMIT ${CELL_NOTES_LIMIT}`,
    [viewer.teamId, timeZone, skaterId, range.startDay, range.endDay, cueId, viewer.coach],
  );
  return {
    timeZone,
    week: range.from,
    notes: rows.map((r) => ({
      id: r.id,
      createdAt: r.created_at,
      day: r.day,
      authorName: r.author_name,
      createdBy: r.created_by ?? '',
      mark: r.mark,
      note: r.note,
      noteShared: r.note_shared,
      sessionId: r.session_id,
    })),
  };
}
