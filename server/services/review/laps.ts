/**
 * Lap-time trends for the evening review (issue #10 §2): one skater's runs of one distance on one
 * track, over ISO weeks in the team's time zone. The selection is SQL (four statements, each
 * bounded by the team and the skater, through ix_runs_team_skater_day and ix_crossings_team_run):
 * - the distances the skater has live runs of (for the client's choice; the latest first);
 * - the runs in the range with their live crossings aggregated in order (a run's week and day are
 *   those of its start in the team's zone; runs.day, the device's own day, only narrows the index
 *   range, by two days either side, since no two zones are more than 26 hours apart);
 * - the personal bests over ALL complete runs (best finish, best section per split index), with
 *   window functions: a complete run (shared/timing.ts runResult, in SQL) is finished, has exactly one crossing per split and no two
 *   crossings at the same instant;
 * - the skater's current target for the distance.
 * Deleted runs and crossings (deleted_at set) never count. The lap arithmetic (sections, layouts,
 * pace schedules) is shared/timing.ts; nothing here does it again.
 */
import type { DataSource } from 'typeorm';
import { LAP_TREND_DEFAULT_WEEKS, type LapRun, type LapRunState, type LapTrend, type LapTrendQuery } from '../../../shared/schemas/review-laps';
import type { Track } from '../../../shared/schemas/clock';
import { distanceLayout, paceSchedule, runResult } from '../../../shared/timing';
import { addIsoWeeks, defaultWeekRange, isIsoWeek, weekOf } from '../../../shared/weeks';
import { weekRange, type WeekRange } from './range';
import { WEEK } from './sql';

const FIRST_WEEK = '2000-W01';
const LAST_WEEK = weekOf(Date.UTC(2100, 11, 28), 'UTC');

/** The weeks asked for; one end alone gets the default length (26 weeks) from it, kept within 2000-2100. */
export function lapRange(query: Pick<LapTrendQuery, 'from' | 'to'>, timeZone: string, now = Date.now()): WeekRange {
  let { from, to } = query;
  if (!from && !to) ({ from, to } = defaultWeekRange(timeZone, now, LAP_TREND_DEFAULT_WEEKS));
  else if (!from) {
    from = addIsoWeeks(to!, -(LAP_TREND_DEFAULT_WEEKS - 1));
    if (!isIsoWeek(from)) from = FIRST_WEEK;
  } else if (!to) {
    to = addIsoWeeks(from, LAP_TREND_DEFAULT_WEEKS - 1);
    if (!isIsoWeek(to)) to = LAST_WEEK;
  }
  return weekRange(from!, to!);
}

interface DistanceRow {
  distance_m: number;
  track: Track;
  runs: number;
  last_day: string;
}

interface RunRow {
  id: string;
  started_at: Date;
  day: string;
  week: string;
  status: LapRun['status'];
  stop_reason: string;
  lane: LapRun['lane'];
  note: string;
  author_name: string;
  target_ms: number | null;
  crossings: number[];
  hand_timed: boolean;
}

interface BestRow {
  kind: 'lap' | 'finish';
  idx: number;
  id: string;
  day: string;
  ms: number;
}

interface TargetRow {
  target_ms: number;
  plan: 'even' | 'shares';
  opener_ms: number | null;
  shares_pct: number[] | null;
  note: string;
}

/** $1 team, $2 skater, $3 zone. */
const distancesSql = `
  SELECT r.distance_m, r.track, count(*)::int AS runs,
         to_char(max(r.started_at) AT TIME ZONE $3, 'YYYY-MM-DD') AS last_day
    FROM runs r
   WHERE r.team_id = $1 AND r.skater_id = $2 AND r.deleted_at IS NULL AND r.distance_m > 0
   GROUP BY r.distance_m, r.track
   ORDER BY max(r.started_at) DESC, r.distance_m, r.track`;

/** $1 team, $2 skater, $3 zone, $4 distance, $5 track, $6 first Monday, $7 Monday after the range. */
const runsSql = `
  SELECT r.id, r.started_at,
         to_char(r.started_at AT TIME ZONE $3, 'YYYY-MM-DD') AS day,
         to_char(r.started_at AT TIME ZONE $3, ${WEEK}) AS week,
         r.status, r.stop_reason, r.lane, r.note, r.author_name, r.target_ms,
         coalesce(array_agg(c.at_ms ORDER BY c.at_ms, c.id) FILTER (WHERE c.id IS NOT NULL), '{}') AS crossings,
         coalesce(bool_or(c.hand_timed), false) AS hand_timed
    FROM runs r
    LEFT JOIN crossings c ON c.team_id = r.team_id AND c.run_id = r.id AND c.deleted_at IS NULL
   WHERE r.team_id = $1 AND r.skater_id = $2 AND r.deleted_at IS NULL
     AND r.distance_m = $4 AND r.track = $5
     AND r.day >= to_char($6::date - 2, 'YYYY-MM-DD') AND r.day <= to_char($7::date + 1, 'YYYY-MM-DD')
     AND r.started_at >= ($6::date::timestamp AT TIME ZONE $3) AND r.started_at < ($7::date::timestamp AT TIME ZONE $3)
   GROUP BY r.team_id, r.id
   ORDER BY r.started_at, r.id`;

/**
 * $1 team, $2 skater, $3 zone, $4 distance, $5 track, $6 splits of the distance. Ties go to the
 * earlier run (the one that set the best first).
 */
const bestsSql = `
  WITH sections AS (
    SELECT r.id, r.started_at, c.at_ms,
           (row_number() OVER w - 1)::int AS idx,
           c.at_ms - coalesce(lag(c.at_ms) OVER w, 0) AS lap_ms,
           count(*) OVER (PARTITION BY r.id) AS n
      FROM runs r
      JOIN crossings c ON c.team_id = r.team_id AND c.run_id = r.id AND c.deleted_at IS NULL
     WHERE r.team_id = $1 AND r.skater_id = $2 AND r.deleted_at IS NULL
       AND r.distance_m = $4 AND r.track = $5 AND r.status = 'finished'
    WINDOW w AS (PARTITION BY r.id ORDER BY c.at_ms, c.id)
  ), complete AS (
    SELECT s.*, to_char(s.started_at AT TIME ZONE $3, 'YYYY-MM-DD') AS day
      FROM sections s
     WHERE s.n = $6
       AND NOT EXISTS (SELECT 1 FROM sections u WHERE u.id = s.id AND u.lap_ms <= 0)
  )
  (SELECT DISTINCT ON (idx) 'lap' AS kind, idx, id, day, lap_ms AS ms
     FROM complete ORDER BY idx, lap_ms, started_at, id)
  UNION ALL
  (SELECT 'finish' AS kind, idx, id, day, at_ms AS ms
     FROM complete WHERE idx = $6 - 1 ORDER BY at_ms, started_at, id LIMIT 1)`;

const targetSql = `
  SELECT target_ms, plan, opener_ms, shares_pct, note
    FROM targets
   WHERE team_id = $1 AND skater_id = $2 AND track = $3 AND distance_m = $4 AND deleted_at IS NULL`;

/** A run's laps, finish and state, from its ordered crossings (shared/timing.ts runResult). */
export function lapRunFigures(status: LapRun['status'], crossingsMs: number[], distanceM: number, track: Track) {
  const result = runResult(distanceM, track, status, crossingsMs);
  // Two crossings at one instant (or one at the gun): no sections can be read off them.
  const state: LapRunState = !result.ordered
    ? 'unordered'
    : result.complete
      ? 'complete'
      : status === 'finished'
        ? 'partial'
        : status === 'stopped'
          ? 'stopped'
          : 'running';
  return { state, lapsMs: result.laps, finishMs: result.finishMs };
}

function scheduleOf(distanceM: number, track: Track, row: TargetRow): number[] {
  try {
    return paceSchedule(distanceM, row.target_ms, {
      track,
      ...(row.opener_ms !== null ? { openerMs: row.opener_ms } : {}),
      ...(row.shares_pct !== null ? { sharesPct: row.shares_pct.map(Number) } : {}),
    }).map((entry) => entry.sectionMs);
  } catch {
    // The server's CHECKs keep plans drawable; a plan that is not gets no per-lap line.
    return [];
  }
}

export async function lapTrend(
  dataSource: DataSource,
  teamId: string,
  timeZone: string,
  skaterId: string,
  query: LapTrendQuery,
  now = Date.now(),
): Promise<LapTrend> {
  const range = lapRange(query, timeZone, now);
  const distanceRows: DistanceRow[] = await dataSource.query(distancesSql, [teamId, skaterId, timeZone]);
  const distances = distanceRows.map((d) => ({ distanceM: d.distance_m, track: d.track, runs: d.runs, lastDay: d.last_day }));
  const chosen =
    query.distanceM !== undefined
      ? { distanceM: query.distanceM, track: query.track ?? ('long' as Track) }
      : distances[0]
        ? { distanceM: distances[0].distanceM, track: distances[0].track }
        : null;

  const base = { timeZone, from: range.from, to: range.to, weeks: range.weeks, skaterId, distances };
  if (!chosen) {
    return { ...base, distanceM: null, track: null, splitsAtM: [], openerM: 0, target: null, runs: [], bests: { finish: null, laps: [] } };
  }
  const { distanceM, track } = chosen;
  const layout = distanceLayout(distanceM, track);
  const splits = layout.splitsAtM.length;

  const [runRows, bestRows, targetRows] = (await Promise.all([
    dataSource.query(runsSql, [teamId, skaterId, timeZone, distanceM, track, range.startDay, range.endDay]),
    dataSource.query(bestsSql, [teamId, skaterId, timeZone, distanceM, track, splits]),
    dataSource.query(targetSql, [teamId, skaterId, track, distanceM]),
  ])) as [RunRow[], BestRow[], TargetRow[]];

  const runs: LapRun[] = runRows.map((row) => {
    const crossingsMs = row.crossings.map(Number);
    return {
      id: row.id,
      startedAt: new Date(row.started_at).toISOString(),
      day: row.day,
      week: row.week,
      status: row.status,
      stopReason: row.stop_reason,
      lane: row.lane,
      note: row.note,
      authorName: row.author_name,
      targetMs: row.target_ms,
      crossingsMs,
      ...lapRunFigures(row.status, crossingsMs, distanceM, track),
      handTimed: row.hand_timed,
    };
  });

  const laps: LapTrend['bests']['laps'] = Array.from({ length: splits }, () => null);
  let finish: LapTrend['bests']['finish'] = null;
  for (const best of bestRows) {
    const entry = { runId: best.id, day: best.day, ms: Number(best.ms) };
    if (best.kind === 'finish') finish = entry;
    else if (best.idx < splits) laps[best.idx] = entry;
  }

  const targetRow = targetRows[0];
  const target = targetRow
    ? {
        targetMs: targetRow.target_ms,
        plan: targetRow.plan,
        openerMs: targetRow.opener_ms,
        sectionsMs: scheduleOf(distanceM, track, targetRow),
        note: targetRow.note,
      }
    : null;

  return { ...base, distanceM, track, splitsAtM: layout.splitsAtM, openerM: layout.openerM, target, runs, bests: { finish, laps } };
}
