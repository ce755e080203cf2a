/**
 * Cue follow-up (issue #10 §3) and the skater's runs by week (§6), read for one skater. The marks
 * are counted in PostgreSQL (one GROUP BY per cue and ISO week in the team's zone, over
 * ix_observations_review_skater); the runs come with their live crossings in one statement over
 * ix_runs_team_skater_day, a run's week being the ISO week of its rink day. What counts as
 * stressed, fading or persisting, and the lap figures, are shared/follow-up.ts's rule: nothing
 * here decides them. Every statement is bounded by the caller's team.
 */
import type { DataSource } from 'typeorm';
import { phases, type Phase } from '../../../shared/cues';
import {
  FOLLOW_UP_WEEKS,
  followUpVerdict,
  isStressed,
  lapBasisOf,
  lapChangeMs,
  lapsInWeeks,
  type TimedRun,
} from '../../../shared/follow-up';
import type { ReviewGroup } from '../../../shared/schemas/review';
import type { FollowUpItem, FollowUpReply, GroupFollowUpReply, RunsByWeekReply, WeekRun } from '../../../shared/schemas/review-follow-up';
import { addIsoWeeks, weekOf } from '../../../shared/weeks';
import { weekRange, weeksAfter, type WeekRange } from './range';
import { groupMembers, WEEK } from './sql';


interface MarkRow {
  cue_id: string;
  phase: Phase;
  label: string;
  archived: boolean;
  week: string;
  needs_work: number;
  good: number;
}

/** $1 team, $2 zone, $3 skater, $4 first Monday, $5 Monday after the last week, $6 phases in order. */
const MARKS_SQL = `
  WITH cells AS (
    SELECT o.cue_id,
           to_char(o.created_at AT TIME ZONE $2, ${WEEK}) AS week,
           count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work,
           count(*) FILTER (WHERE o.mark = 'good')::int AS good
      FROM observations o
     WHERE o.team_id = $1 AND o.skater_id = $3 AND o.deleted_at IS NULL
       AND o.created_at >= ($4::date::timestamp AT TIME ZONE $2) AND o.created_at < ($5::date::timestamp AT TIME ZONE $2)
     GROUP BY 1, 2
  )
  SELECT c.id AS cue_id, c.phase, c.label, c.archived, cells.week, cells.needs_work, cells.good
    FROM cells
    JOIN cues c ON c.team_id = $1 AND c.id = cells.cue_id AND c.deleted_at IS NULL
   ORDER BY array_position($6::text[], c.phase), c.sort_order, c.label, c.id, cells.week`;

interface RunRow {
  id: string;
  heat_id: string;
  skater_id: string;
  day: string;
  week: string;
  distance_m: number;
  track: 'long' | 'short';
  lane: 'inner' | 'outer' | 'group';
  started_at: string;
  start_offset_ms: number;
  target_ms: number | null;
  status: 'running' | 'finished' | 'stopped';
  stop_reason: string;
  note: string;
  crossings: { id: string; atMs: number; handTimed: boolean }[];
}

/** The skater's finished runs whose rink day falls in [$4, $5), newest first, each with its live crossings in order. */
async function finishedRuns(dataSource: DataSource, teamId: string, skaterId: string, startDay: string, endDay: string): Promise<RunRow[]> {
  return dataSource.query(
    `SELECT r.id, r.heat_id, r.skater_id, r.day, to_char(r.day::date, ${WEEK}) AS week, r.distance_m, r.track, r.lane,
            to_char(r.started_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') AS started_at,
            r.start_offset_ms, r.target_ms, r.status, r.stop_reason, r.note,
            coalesce(x.crossings, '[]'::json) AS crossings
       FROM runs r
       LEFT JOIN LATERAL (
         SELECT json_agg(json_build_object('id', c.id, 'atMs', c.at_ms, 'handTimed', c.hand_timed) ORDER BY c.at_ms, c.id) AS crossings
           FROM crossings c
          WHERE c.team_id = r.team_id AND c.run_id = r.id AND c.deleted_at IS NULL
       ) x ON true
      WHERE r.team_id = $1 AND r.skater_id = $2 AND r.deleted_at IS NULL AND r.status = 'finished'
        AND r.day >= $3 AND r.day < $4
      ORDER BY r.day DESC, r.started_at DESC, r.id`,
    [teamId, skaterId, startDay, endDay],
  );
}

const timed = (runs: RunRow[]): TimedRun[] =>
  runs.map((r) => ({ week: r.week, distanceM: r.distance_m, track: r.track, crossingsMs: r.crossings.map((c) => c.atMs) }));

/** One skater's stressed (cue, week) pairs in `range` from their counts and runs (shared/follow-up.ts decides). */
function assemble(marks: MarkRow[], runs: RunRow[], range: WeekRange, threshold: number, currentWeek: string) {
  const timedRuns = timed(runs);
  // The runs reach FOLLOW_UP_WEEKS past the range (reachOf): the basis counts those weeks too.
  const basis = lapBasisOf(timedRuns);
  const inRange = new Set(range.weeks);

  const byCue = new Map<string, { cue: MarkRow; counts: Map<string, MarkRow> }>();
  for (const row of marks) {
    const entry = byCue.get(row.cue_id) ?? { cue: row, counts: new Map<string, MarkRow>() };
    entry.counts.set(row.week, row);
    byCue.set(row.cue_id, entry);
  }

  const items: (FollowUpItem & { order: number })[] = [];
  let order = 0;
  for (const { cue, counts } of byCue.values()) {
    for (const [week, count] of counts) {
      if (!inRange.has(week) || !isStressed({ needsWork: count.needs_work, good: count.good }, threshold)) continue;
      const after = Array.from({ length: FOLLOW_UP_WEEKS }, (_, i) => {
        const next = addIsoWeeks(week, i + 1);
        const c = counts.get(next);
        return {
          week: next,
          needsWork: c?.needs_work ?? 0,
          good: c?.good ?? 0,
          counted: next <= currentWeek,
          laps: lapsInWeeks(timedRuns, basis, next <= currentWeek ? [next] : []),
        };
      });
      const stressedLaps = lapsInWeeks(timedRuns, basis, [week]);
      const afterLaps = lapsInWeeks(
        timedRuns,
        basis,
        after.filter((a) => a.counted).map((a) => a.week),
      );
      items.push({
        order: order++,
        cueId: cue.cue_id,
        phase: cue.phase,
        label: cue.label,
        archived: cue.archived,
        week,
        needsWork: count.needs_work,
        good: count.good,
        laps: stressedLaps,
        after,
        afterLaps,
        lapChangeMs: lapChangeMs(stressedLaps, afterLaps),
        ...followUpVerdict({ needsWork: count.needs_work, good: count.good }, after),
      });
    }
  }
  items.sort((a, b) => (a.week === b.week ? a.order - b.order : a.week < b.week ? 1 : -1));
  return { lapBasis: basis, items: items.map(({ order: _order, ...item }) => item) };
}

/**
 * The counts and runs reach four weeks past the range: a stressed week's follow-up. Near the end
 * of 2100 (the last year a week label may name) the reach stops there: those weeks are years
 * away, "to come" whatever they hold.
 */
const reachOf = (range: WeekRange) => weekRange(range.from, weeksAfter(range.to, FOLLOW_UP_WEEKS));

/**
 * The stressed (cue, week) pairs of `range` for one skater, each with the four weeks after it.
 * The caller has checked the viewer may see this skater.
 */
export async function skaterFollowUp(
  dataSource: DataSource,
  teamId: string,
  timeZone: string,
  skaterId: string,
  range: WeekRange,
  threshold: number,
  now = Date.now(),
): Promise<FollowUpReply> {
  const reach = reachOf(range);
  const [marks, runs] = await Promise.all([
    dataSource.query(MARKS_SQL, [teamId, timeZone, skaterId, reach.startDay, reach.endDay, phases]) as Promise<MarkRow[]>,
    finishedRuns(dataSource, teamId, skaterId, reach.startDay, reach.endDay),
  ]);
  const currentWeek = weekOf(now, timeZone);
  return { timeZone, from: range.from, to: range.to, threshold, currentWeek, ...assemble(marks, runs, range, threshold, currentWeek) };
}

/**
 * The same for every live skater of a group (coaches only): one statement counts the marks per
 * skater, cue and week; one reads the members' finished runs; each skater's stressed cues are then
 * assembled as for one skater (their own lap basis). Skaters without a stressed cue are left out.
 */
export async function groupFollowUp(
  dataSource: DataSource,
  teamId: string,
  timeZone: string,
  group: ReviewGroup,
  range: WeekRange,
  threshold: number,
  now = Date.now(),
): Promise<GroupFollowUpReply> {
  const reach = reachOf(range);
  const members = groupMembers(group);
  const [people, marks, runs] = await Promise.all([
    dataSource.query(`${members.sql} ORDER BY s.display_name COLLATE "und-x-icu", s.id`, [teamId, members.param]) as Promise<
      { id: string; display_name: string }[]
    >,
    dataSource.query(
      `WITH members AS (${members.sql}),
       cells AS (
         SELECT o.skater_id, o.cue_id,
                to_char(o.created_at AT TIME ZONE $3, ${WEEK}) AS week,
                count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work,
                count(*) FILTER (WHERE o.mark = 'good')::int AS good
           FROM observations o
          WHERE o.team_id = $1 AND o.deleted_at IS NULL AND o.skater_id IN (SELECT id FROM members)
            AND o.created_at >= ($4::date::timestamp AT TIME ZONE $3) AND o.created_at < ($5::date::timestamp AT TIME ZONE $3)
          GROUP BY 1, 2, 3
       )
       SELECT cells.skater_id, c.id AS cue_id, c.phase, c.label, c.archived, cells.week, cells.needs_work, cells.good
         FROM cells
         JOIN cues c ON c.team_id = $1 AND c.id = cells.cue_id AND c.deleted_at IS NULL
        ORDER BY cells.skater_id, array_position($6::text[], c.phase), c.sort_order, c.label, c.id, cells.week`,
      [teamId, members.param, timeZone, reach.startDay, reach.endDay, phases],
    ) as Promise<(MarkRow & { skater_id: string })[]>,
    dataSource.query(
      `WITH members AS (${members.sql})
       SELECT r.skater_id, to_char(r.day::date, ${WEEK}) AS week, r.distance_m, r.track,
              coalesce(x.crossings, '[]'::json) AS crossings
         FROM runs r
         LEFT JOIN LATERAL (
           SELECT json_agg(json_build_object('atMs', c.at_ms) ORDER BY c.at_ms, c.id) AS crossings
             FROM crossings c
            WHERE c.team_id = r.team_id AND c.run_id = r.id AND c.deleted_at IS NULL
         ) x ON true
        WHERE r.team_id = $1 AND r.skater_id IN (SELECT id FROM members) AND r.deleted_at IS NULL AND r.status = 'finished'
          AND r.day >= $3 AND r.day < $4`,
      [teamId, members.param, reach.startDay, reach.endDay],
    ) as Promise<(RunRow & { skater_id: string })[]>,
  ]);
  const currentWeek = weekOf(now, timeZone);
  const skaters: GroupFollowUpReply['skaters'] = [];
  for (const person of people) {
    const own = assemble(
      marks.filter((m) => m.skater_id === person.id),
      runs.filter((r) => r.skater_id === person.id),
      range,
      threshold,
      currentWeek,
    );
    if (own.items.length > 0) skaters.push({ skaterId: person.id, displayName: person.display_name, ...own });
  }
  return { timeZone, from: range.from, to: range.to, threshold, currentWeek, group, skaters };
}

/** The skater's finished runs in the range's weeks (by rink day), newest first. */
export async function skaterRunsByWeek(
  dataSource: DataSource,
  teamId: string,
  timeZone: string,
  skaterId: string,
  range: WeekRange,
): Promise<RunsByWeekReply> {
  const rows = await finishedRuns(dataSource, teamId, skaterId, range.startDay, range.endDay);
  const runs: WeekRun[] = rows.map((r) => ({
    id: r.id,
    heatId: r.heat_id,
    skaterId: r.skater_id,
    day: r.day,
    week: r.week,
    distanceM: r.distance_m,
    track: r.track,
    lane: r.lane,
    startedAt: r.started_at,
    startOffsetMs: r.start_offset_ms,
    targetMs: r.target_ms,
    status: r.status,
    stopReason: r.stop_reason,
    note: r.note,
    crossings: r.crossings,
  }));
  return { timeZone, from: range.from, to: range.to, weeks: range.weeks, runs };
}
