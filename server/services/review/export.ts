/**
 * The review's CSV export and weekly sheet (issue #10 §5).
 *
 * Export: rows are read in keyset pages of EXPORT_PAGE rows, ordered by (created_at, id) for
 * notes and (started_at, id) for runs, team_id leading every read (ix_observations_export,
 * ix_runs_review_started). A page is asked for only when the CSV stream wants more
 * (Readable.from over an async generator: the socket's backpressure reaches the database), so a
 * 100,000-row export never holds more than one page. Days and times are in the team's zone: the
 * range is [local midnight of `from`, local midnight after `to`).
 *
 * Cells: text cells that a spreadsheet would read as a formula (starting with =, +, -, @, tab or
 * carriage return) get a leading single quote. Only text cells: the number columns (ms, metres,
 * the gap to the target in seconds, which is often negative) are written as numbers and never
 * touched, so "-0.42" stays a number. Private notes are exported: the export is for coaches only.
 */
import { Readable, Transform } from 'node:stream';
import { stringify, type Stringifier } from 'csv-stringify';
import type { DataSource } from 'typeorm';
import { phases, type Phase } from '../../../shared/cues';
import type { ExportKind, SheetRun, WeeklySheet } from '../../../shared/schemas/review-export';
import { formatRaceTime, runResult, type Track } from '../../../shared/timing';
import { weekStartDay } from '../../../shared/weeks';
import { badRequest } from '../../lib/errors';
import { weekRange } from './range';
import { localMidnight } from './sql';

/** Rows per database read. */
export const EXPORT_PAGE = 5000;

const FORMULA_START = /^[=+\-@\t\r]/;

/** A text cell, made safe for spreadsheets: a formula-like start gets a leading single quote. */
export const textCell = (value: string | null | undefined): string => {
  const text = value ?? '';
  return FORMULA_START.test(text) ? `'${text}` : text;
};

/** The day after a YYYY-MM-DD day (UTC arithmetic on a calendar day: no zone involved). */
const dayAfter = (day: string) => new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

/** "+02:00" from an offset in seconds. */
function offsetText(seconds: number): string {
  const sign = seconds < 0 ? '-' : '+';
  const abs = Math.abs(seconds);
  const h = Math.floor(abs / 3600);
  const m = Math.floor((abs % 3600) / 60);
  return `${sign}${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}`;
}

/** Every given id is a skater of the team (retired ones too); else a 400 naming skaterIds. */
export async function assertSkatersInTeam(dataSource: DataSource, teamId: string, ids: readonly string[]): Promise<void> {
  const found: { id: string }[] = await dataSource.query(
    `SELECT id FROM skaters WHERE team_id = $1 AND id = ANY($2::uuid[]) AND deleted_at IS NULL`,
    [teamId, ids],
  );
  const known = new Set(found.map((r) => r.id));
  const missing = ids.filter((id) => !known.has(id));
  if (missing.length > 0) {
    const message = `skaterIds names ${missing.length === 1 ? 'an id that is not a skater' : `${missing.length} ids that are not skaters`} of this team (${missing.slice(0, 3).join(', ')}${missing.length > 3 ? ', …' : ''})`;
    throw badRequest(message, { skaterIds: message });
  }
}

export interface ExportRange {
  teamId: string;
  timeZone: string;
  from: string;
  to: string;
  /** null: every skater of the team. */
  skaterIds: string[] | null;
}

// ---- observations --------------------------------------------------------------------------

export const observationColumns = [
  'day',
  'iso_week',
  'local_time',
  'skater',
  'group',
  'phase',
  'cue',
  'mark',
  'note',
  'note_shared',
  'coach',
  'session_title',
  'session_day',
  'observation_id',
  'skater_id',
  'cue_id',
  'session_id',
] as const;

interface ObservationRow {
  id: string;
  /** created_at / started_at as PostgreSQL writes it (with its offset): the next page's start. */
  cursor_at: string;
  week: string;
  local: string;
  offset_s: number;
  skater: string;
  group_name: string | null;
  phase: string | null;
  cue: string | null;
  mark: string;
  note: string;
  note_shared: boolean;
  coach: string;
  session_title: string | null;
  session_day: string | null;
  skater_id: string;
  cue_id: string;
  session_id: string;
}

/**
 * One page of a keyset read of `table` (alias `a`), live rows of the team in the range of local
 * days, some skaters or all, ordered by the instant column `at` and the id: $1 team, $2 zone,
 * $3 first day, $4 the day after the last, $5 skater ids or null, [$6 $7 the keyset]. Picked first
 * as a MATERIALIZED page (an in-order index range) and only then joined to names by the caller.
 */
function keysetPage(table: 'observations' | 'runs', a: string, at: string, after: boolean): string {
  return `WITH page AS MATERIALIZED (
    SELECT ${a}.* FROM ${table} ${a}
     WHERE ${a}.team_id = $1 AND ${a}.deleted_at IS NULL
       AND ${a}.${at} >= ${localMidnight('$3')} AND ${a}.${at} < ${localMidnight('$4')}
       AND ($5::uuid[] IS NULL OR ${a}.skater_id = ANY($5::uuid[]))
       ${after ? `AND ${a}.${at} >= $6::timestamptz AND (${a}.${at}, ${a}.id) > ($6::timestamptz, $7::uuid)` : ''}
     ORDER BY ${a}.${at}, ${a}.id
     LIMIT ${EXPORT_PAGE}
  )`;
}

/** The instant `at` of a page row as the next page's cursor, and as ISO week, local time and UTC offset in the team's zone ($2). */
const momentColumns = (a: string, at: string) => `${a}.${at}::text AS cursor_at,
         to_char(${a}.${at} AT TIME ZONE $2, 'IYYY-"W"IW') AS week,
         to_char(${a}.${at} AT TIME ZONE $2, 'YYYY-MM-DD"T"HH24:MI:SS') AS local,
         extract(epoch FROM (${a}.${at} AT TIME ZONE $2) - (${a}.${at} AT TIME ZONE 'UTC'))::int AS offset_s`;

/**
 * A page of notes over ix_observations_export, joined to their names only after it is picked:
 * joined first, the planner sorted the whole rest of the range for every page.
 */
const observationSql = (after: boolean) => `
  ${keysetPage('observations', 'o', 'created_at', after)}
  SELECT o.id,
         ${momentColumns('o', 'created_at')},
         s.display_name AS skater, g.name AS group_name, c.phase, c.label AS cue,
         o.mark, o.note, o.note_shared,
         coalesce(nullif(o.author_name, ''), u.display_name, '') AS coach,
         se.title AS session_title, se.day AS session_day,
         o.skater_id, o.cue_id, o.session_id
    FROM page o
    JOIN skaters s ON s.team_id = o.team_id AND s.id = o.skater_id
    LEFT JOIN skater_groups g ON g.team_id = o.team_id AND g.id = s.group_id
    LEFT JOIN cues c ON c.team_id = o.team_id AND c.id = o.cue_id
    LEFT JOIN sessions se ON se.team_id = o.team_id AND se.id = o.session_id
    LEFT JOIN users u ON u.id = o.created_by
   ORDER BY o.created_at, o.id`;

const markWord = (mark: string) => (mark === 'good' ? 'good' : 'needs work');

function observationRecord(r: ObservationRow): unknown[] {
  return [
    r.local.slice(0, 10),
    r.week,
    `${r.local}${offsetText(r.offset_s)}`,
    textCell(r.skater),
    textCell(r.group_name),
    textCell(r.phase),
    textCell(r.cue),
    markWord(r.mark),
    textCell(r.note),
    r.note_shared ? 'yes' : 'no',
    textCell(r.coach),
    textCell(r.session_title),
    r.session_day ?? '',
    r.id,
    r.skater_id,
    r.cue_id,
    r.session_id,
  ];
}

async function* observationRecords(dataSource: DataSource, range: ExportRange): AsyncGenerator<unknown[]> {
  const base = [range.teamId, range.timeZone, range.from, dayAfter(range.to), range.skaterIds];
  yield* paged<ObservationRow>(
    (cursor) => dataSource.query(observationSql(cursor !== null), cursor ? [...base, ...cursor] : base),
    observationRecord,
  );
}

/**
 * Pages through a keyset read: the next page is asked for as soon as this one arrives (so the
 * database reads it while this one is written out: at most two pages are held), and its records
 * are handed out one at a time as the consumer pulls.
 */
async function* paged<Row extends { cursor_at: string; id: string }>(
  read: (cursor: [string, string] | null) => Promise<Row[]>,
  record: (row: Row) => unknown[],
): AsyncGenerator<unknown[]> {
  let next = read(null);
  for (;;) {
    const rows = await next;
    const more = rows.length === EXPORT_PAGE;
    if (more) {
      const last = rows[rows.length - 1];
      next = read([last.cursor_at, last.id]);
      // If the consumer stops early (the download is cancelled), nobody awaits this read.
      next.catch(() => undefined);
    }
    for (const row of rows) yield record(row);
    if (!more) return;
  }
}

// ---- runs ----------------------------------------------------------------------------------

export const runColumns = [
  'day',
  'iso_week',
  'started_local',
  'skater',
  'group',
  'distance_m',
  'track',
  'lane',
  'status',
  'finish',
  'finish_ms',
  'lap_count',
  'laps',
  'target',
  'target_ms',
  'finish_minus_target_s',
  'stop_reason',
  'note',
  'timed_by',
  'run_id',
  'heat_id',
  'skater_id',
] as const;

interface RunRow {
  id: string;
  /** created_at / started_at as PostgreSQL writes it (with its offset): the next page's start. */
  cursor_at: string;
  week: string;
  local: string;
  offset_s: number;
  skater: string;
  group_name: string | null;
  distance_m: number;
  track: Track;
  lane: string;
  status: 'running' | 'finished' | 'stopped';
  target_ms: number | null;
  stop_reason: string;
  note: string;
  timed_by: string;
  heat_id: string;
  skater_id: string;
  crossings: number[] | null;
}

/** The same for runs, over ix_runs_review_started (the page first, then its names and crossings). */
const runSql = (after: boolean) => `
  ${keysetPage('runs', 'r', 'started_at', after)}
  SELECT r.id,
         ${momentColumns('r', 'started_at')},
         s.display_name AS skater, g.name AS group_name,
         r.distance_m, r.track, r.lane, r.status, r.target_ms, r.stop_reason, r.note,
         coalesce(nullif(r.author_name, ''), u.display_name, '') AS timed_by,
         r.heat_id, r.skater_id,
         (SELECT array_agg(x.at_ms ORDER BY x.at_ms) FROM crossings x
           WHERE x.team_id = r.team_id AND x.run_id = r.id AND x.deleted_at IS NULL) AS crossings
    FROM page r
    JOIN skaters s ON s.team_id = r.team_id AND s.id = r.skater_id
    LEFT JOIN skater_groups g ON g.team_id = r.team_id AND g.id = s.group_id
    LEFT JOIN users u ON u.id = r.created_by
   ORDER BY r.started_at, r.id`;

function runRecord(r: RunRow): unknown[] {
  const { finishMs, laps } = runResult(r.distance_m, r.track, r.status, r.crossings ?? []);
  // A number column: seconds with three decimals, negative when faster than the target.
  const gap = finishMs !== null && r.target_ms !== null ? Math.round(finishMs - r.target_ms) / 1000 : null;
  return [
    r.local.slice(0, 10),
    r.week,
    `${r.local}${offsetText(r.offset_s)}`,
    textCell(r.skater),
    textCell(r.group_name),
    r.distance_m,
    r.track,
    r.lane,
    r.status,
    finishMs === null ? '' : formatRaceTime(finishMs),
    finishMs,
    laps.length,
    laps.map(formatRaceTime).join(' '),
    r.target_ms === null ? '' : formatRaceTime(r.target_ms),
    r.target_ms,
    gap,
    textCell(r.stop_reason),
    textCell(r.note),
    textCell(r.timed_by),
    r.id,
    r.heat_id,
    r.skater_id,
  ];
}

async function* runRecords(dataSource: DataSource, range: ExportRange): AsyncGenerator<unknown[]> {
  const base = [range.teamId, range.timeZone, range.from, dayAfter(range.to), range.skaterIds];
  yield* paged<RunRow>((cursor) => dataSource.query(runSql(cursor !== null), cursor ? [...base, ...cursor] : base), runRecord);
}

// ---- the CSV stream ------------------------------------------------------------------------

/** The CSV writer every export uses: a header row, CRLF records (RFC 4180), empty for null. */
export function csvWriter(columns: readonly string[]): Stringifier {
  return stringify({
    header: true,
    columns: [...columns],
    record_delimiter: 'windows',
    cast: {
      // Numbers are written as numbers (never escaped); booleans never reach here (yes/no).
      number: (value) => String(value),
    },
  });
}

/**
 * Gathers the writer's small chunks (one per record) into pieces of about 64 KiB, so the socket
 * gets a few hundred writes for 100,000 rows instead of one per row. Backpressure passes through.
 */
export function coalesce(size = 64 * 1024): Transform {
  let parts: Buffer[] = [];
  let held = 0;
  return new Transform({
    transform(chunk: Buffer, _encoding, done) {
      parts.push(chunk);
      held += chunk.length;
      if (held >= size) {
        this.push(Buffer.concat(parts, held));
        parts = [];
        held = 0;
      }
      done();
    },
    flush(done) {
      if (held > 0) this.push(Buffer.concat(parts, held));
      done();
    },
  });
}

/**
 * The records of an export as a stream, read page by page as the consumer pulls them. The first
 * page is read before this resolves, so a database that cannot be reached fails the request
 * while it can still answer with an error instead of a cut-off file.
 */
export async function exportRecords(dataSource: DataSource, kind: ExportKind, range: ExportRange): Promise<Readable> {
  const records = kind === 'observations' ? observationRecords(dataSource, range) : runRecords(dataSource, range);
  const first = await records.next();
  async function* all(): AsyncGenerator<unknown[]> {
    if (first.done) return;
    yield first.value;
    yield* records;
  }
  return Readable.from(all(), { objectMode: true, highWaterMark: 256 });
}

export const exportColumns = (kind: ExportKind): readonly string[] => (kind === 'observations' ? observationColumns : runColumns);

// ---- the weekly sheet ----------------------------------------------------------------------

/** One skater's ISO week: cue counts (every note), shared notes only, runs with laps. */
export async function weeklySheet(
  dataSource: DataSource,
  teamId: string,
  timeZone: string,
  skaterId: string,
  week: string,
): Promise<WeeklySheet> {
  const firstDay = weekStartDay(week);
  // The Monday after, by calendar arithmetic: 2100-W52's has no week label (labels stop at 2100).
  const nextMonday = weekRange(week, week).endDay;
  const lastDay = new Date(Date.parse(`${nextMonday}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
  const params = [teamId, timeZone, firstDay, nextMonday, skaterId];
  const within = (column: string) => `${column} >= ${localMidnight('$3')} AND ${column} < ${localMidnight('$4')}`;

  const [skater]: { id: string; display_name: string; group_name: string | null }[] = await dataSource.query(
    `SELECT s.id, s.display_name, g.name AS group_name FROM skaters s
       LEFT JOIN skater_groups g ON g.team_id = s.team_id AND g.id = s.group_id AND g.deleted_at IS NULL
      WHERE s.team_id = $1 AND s.id = $2 AND s.deleted_at IS NULL`,
    [teamId, skaterId],
  );

  const cues: { cue_id: string; phase: Phase; label: string; needs_work: number; good: number }[] = await dataSource.query(
    `SELECT c.id AS cue_id, c.phase, c.label,
            count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work,
            count(*) FILTER (WHERE o.mark = 'good')::int AS good
       FROM observations o
       JOIN cues c ON c.team_id = o.team_id AND c.id = o.cue_id AND c.deleted_at IS NULL
      WHERE o.team_id = $1 AND o.skater_id = $5 AND o.deleted_at IS NULL AND ${within('o.created_at')}
      GROUP BY c.id, c.phase, c.label, c.sort_order
      ORDER BY array_position($6::text[], c.phase), c.sort_order, c.label, c.id`,
    [...params, phases],
  );

  const notes: { id: string; day: string; time: string; phase: Phase | null; label: string | null; mark: 'needs_work' | 'good'; note: string; author: string }[] =
    await dataSource.query(
      `SELECT o.id,
              to_char(o.created_at AT TIME ZONE $2, 'YYYY-MM-DD') AS day,
              to_char(o.created_at AT TIME ZONE $2, 'HH24:MI') AS time,
              c.phase, c.label, o.mark, o.note,
              coalesce(nullif(o.author_name, ''), u.display_name, '') AS author
         FROM observations o
         LEFT JOIN cues c ON c.team_id = o.team_id AND c.id = o.cue_id
         LEFT JOIN users u ON u.id = o.created_by
        WHERE o.team_id = $1 AND o.skater_id = $5 AND o.deleted_at IS NULL AND o.note_shared AND o.note <> ''
          AND ${within('o.created_at')}
        ORDER BY o.created_at, o.id`,
      params,
    );

  const runs: (Omit<RunRow, 'cursor_at' | 'week' | 'local' | 'offset_s' | 'skater' | 'group_name' | 'lane' | 'stop_reason' | 'note' | 'timed_by' | 'heat_id' | 'skater_id'> & { day: string; time: string })[] =
    await dataSource.query(
      `SELECT r.id,
              to_char(r.started_at AT TIME ZONE $2, 'YYYY-MM-DD') AS day,
              to_char(r.started_at AT TIME ZONE $2, 'HH24:MI') AS time,
              r.distance_m, r.track, r.status, r.target_ms,
              (SELECT array_agg(x.at_ms ORDER BY x.at_ms) FROM crossings x
                WHERE x.team_id = r.team_id AND x.run_id = r.id AND x.deleted_at IS NULL) AS crossings
         FROM runs r
        WHERE r.team_id = $1 AND r.skater_id = $5 AND r.deleted_at IS NULL AND ${within('r.started_at')}
        ORDER BY r.started_at, r.id`,
      params,
    );

  return {
    timeZone,
    week,
    firstDay,
    lastDay,
    skater: { id: skater.id, displayName: skater.display_name, groupName: skater.group_name },
    cues: cues.map((c) => ({ cueId: c.cue_id, phase: c.phase, label: c.label, needsWork: c.needs_work, good: c.good })),
    notes: notes.map((n) => ({
      id: n.id,
      day: n.day,
      time: n.time,
      phase: n.phase,
      cueLabel: n.label ?? '',
      mark: n.mark,
      note: n.note,
      authorName: n.author,
    })),
    runs: runs.map((r): SheetRun => {
      const { finishMs, laps } = runResult(r.distance_m, r.track, r.status, r.crossings ?? []);
      return {
        id: r.id,
        day: r.day,
        time: r.time,
        distanceM: r.distance_m,
        track: r.track,
        status: r.status,
        finish: finishMs === null ? null : formatRaceTime(finishMs),
        laps: laps.map(formatRaceTime),
        target: r.target_ms === null ? null : formatRaceTime(r.target_ms),
      };
    }),
  };
}
