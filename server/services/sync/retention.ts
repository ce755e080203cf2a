/**
 * Retention that runs by itself (shared/SYNC.md "Pull"): tombstones older than the 180-day horizon
 * are purged for every team (purge.ts raises each team's sync horizon, so a device whose cursor is
 * older gets 410 and re-syncs), and op_log rows older than the op-log retention are trimmed.
 *
 * Why this is safe for a device that comes back late: an op id in op_log is what turns a retried
 * push into `duplicate`. A device that never got the reply to a push keeps those ops and sends
 * them again, with the same ids, whenever it is back - also after a 410 re-sync, which keeps the
 * outbox. While the op id is in op_log the retry changes nothing. Once it is trimmed the op is new
 * again: an edit or delete of a record that still exists merges by its clock (a no-op for one
 * already applied), and a create or edit of a record deleted and purged since finds its id in
 * sync_tombstones (purge.ts remembers every purged id there, never trimmed: an id and a clock
 * value per deleted record) and is dropped - the record does not come back. op_log is kept at
 * least as long as tombstones (OP_LOG_RETENTION_DAYS >= TOMBSTONE_RETENTION_DAYS, default + 30
 * days) so a retry within the horizon is answered from the log, with its stored result.
 *
 * `runRetention` does one pass and returns its figures; `scheduleRetention` runs it once at once
 * and then every interval (timer unref'd, one pass at a time, stopped with the server). Its clock
 * and timers are injectable so a test drives months of schedule without waiting.
 */
import type { DataSource } from 'typeorm';
import { TOMBSTONE_RETENTION_DAYS } from '../../../shared/schemas/sync';
import { purgeTombstones } from './purge';

const DAY_MS = 86_400_000;

/** The op-log retention used when none is configured: the tombstone horizon plus a month. */
export const DEFAULT_OP_LOG_RETENTION_DAYS = TOMBSTONE_RETENTION_DAYS + 30;

/** op_log rows deleted per statement, so a large trim never holds one long lock. */
const TRIM_BATCH = 5000;

export interface RetentionOptions {
  /** Days op_log rows are kept; at least TOMBSTONE_RETENTION_DAYS. */
  opLogRetentionDays?: number;
  /** Only these teams (tests, which share one database with other test files). Default: every team. */
  teamIds?: readonly string[];
}

export interface RetentionFigures {
  /** The instant the pass ran for (its clock). */
  at: string;
  /** Tombstones deleted before this instant were purged. */
  tombstoneCutoff: string;
  /** op_log rows recorded before this instant were trimmed. */
  opLogCutoff: string;
  teams: number;
  tombstonesPurged: number;
  /** Teams whose sync horizon moved (devices with an older cursor now get 410). */
  teamsPurged: number;
  opLogTrimmed: number;
  durationMs: number;
}

/** One retention pass over every team (or `options.teamIds`) as of `now`. */
export async function runRetention(
  dataSource: DataSource,
  now: number | Date = Date.now(),
  options: RetentionOptions = {},
): Promise<RetentionFigures> {
  const started = Date.now();
  const at = typeof now === 'number' ? now : now.getTime();
  const opLogDays = options.opLogRetentionDays ?? DEFAULT_OP_LOG_RETENTION_DAYS;
  if (!Number.isFinite(opLogDays) || opLogDays < TOMBSTONE_RETENTION_DAYS) {
    throw new RangeError(`op_log must be kept at least as long as tombstones (${TOMBSTONE_RETENTION_DAYS} days), not ${opLogDays}`);
  }
  const tombstoneCutoff = new Date(at - TOMBSTONE_RETENTION_DAYS * DAY_MS);
  const opLogCutoff = new Date(at - opLogDays * DAY_MS);

  const teams: string[] = (
    options.teamIds
      ? await dataSource.query(`SELECT id FROM teams WHERE id = ANY($1::uuid[]) ORDER BY id`, [[...options.teamIds]])
      : await dataSource.query(`SELECT id FROM teams ORDER BY id`)
  ).map((row: { id: string }) => row.id);

  let tombstonesPurged = 0;
  let teamsPurged = 0;
  let opLogTrimmed = 0;
  for (const teamId of teams) {
    const { purged } = await purgeTombstones(dataSource, teamId, tombstoneCutoff);
    tombstonesPurged += purged;
    if (purged > 0) teamsPurged += 1;
    opLogTrimmed += await trimOpLog(dataSource, teamId, opLogCutoff);
  }
  return {
    at: new Date(at).toISOString(),
    tombstoneCutoff: tombstoneCutoff.toISOString(),
    opLogCutoff: opLogCutoff.toISOString(),
    teams: teams.length,
    tombstonesPurged,
    teamsPurged,
    opLogTrimmed,
    durationMs: Date.now() - started,
  };
}

/** Deletes a team's op_log rows recorded before `cutoff`, in batches (index on team_id, created_at). */
async function trimOpLog(dataSource: DataSource, teamId: string, cutoff: Date): Promise<number> {
  let total = 0;
  for (;;) {
    const [{ n }]: { n: string }[] = await dataSource.query(
      `WITH gone AS (
         DELETE FROM op_log WHERE team_id = $1 AND op_id IN (
           SELECT op_id FROM op_log WHERE team_id = $1 AND created_at < $2 LIMIT ${TRIM_BATCH})
         RETURNING 1)
       SELECT count(*) AS n FROM gone`,
      [teamId, cutoff],
    );
    total += Number(n);
    if (Number(n) < TRIM_BATCH) return total;
  }
}

// ---- the schedule -------------------------------------------------------------------------------

/** The timer functions the schedule uses (real ones by default, a fake clock's in tests). */
export interface ScheduleTimers {
  setTimeout(run: () => void, ms: number): unknown;
  clearTimeout(handle: unknown): void;
}

/** Real timers that never keep the process alive on their own. */
const realTimers: ScheduleTimers = {
  setTimeout: (run, ms) => setTimeout(run, ms).unref(),
  clearTimeout: (handle) => clearTimeout(handle as NodeJS.Timeout),
};

export interface ScheduleLog {
  info(fields: object, message: string): void;
  error(fields: object, message: string): void;
}

export interface RetentionScheduleOptions extends RetentionOptions {
  /** Time between the end of one pass and the start of the next. */
  intervalMs: number;
  log: ScheduleLog;
  /** The clock each pass runs for. */
  now?: () => number;
  timers?: ScheduleTimers;
  /** Called with each pass's figures (after they are logged). */
  onPass?: (figures: RetentionFigures) => void;
}

export interface RetentionSchedule {
  /** Waits for the pass that is running, if any. */
  idle(): Promise<void>;
  /** No further passes; waits for the running one (call before closing the DataSource). */
  stop(): Promise<void>;
}

/** Runs retention once now, then every `intervalMs` after each pass ends (passes never overlap). */
export function scheduleRetention(dataSource: DataSource, options: RetentionScheduleOptions): RetentionSchedule {
  const { intervalMs, log, now = Date.now, timers = realTimers, onPass, ...retention } = options;
  // Node's timers hold at most 2^31-1 ms (about 24.8 days); a longer delay would fire at once.
  if (!(intervalMs > 0 && intervalMs <= 2 ** 31 - 1)) throw new RangeError(`retention interval out of range: ${intervalMs} ms`);
  let stopped = false;
  let handle: unknown;
  let running: Promise<void> | null = null;

  const pass = () => {
    handle = undefined;
    running = runRetention(dataSource, now(), retention)
      .then((figures) => {
        log.info(
          { retention: figures },
          `retention: purged ${figures.tombstonesPurged} tombstones (${figures.teamsPurged} of ${figures.teams} teams), trimmed ${figures.opLogTrimmed} op-log rows`,
        );
        onPass?.(figures);
      })
      .catch((error: unknown) => log.error({ err: error }, 'retention pass failed; the next one runs as scheduled'))
      .finally(() => {
        running = null;
        if (!stopped) handle = timers.setTimeout(pass, intervalMs);
      });
  };
  pass();

  return {
    idle: async () => {
      while (running) await running;
    },
    stop: async () => {
      stopped = true;
      if (handle !== undefined) timers.clearTimeout(handle);
      handle = undefined;
      while (running) await running;
    },
  };
}
