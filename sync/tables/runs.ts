/**
 * The clock's runs and crossings on the device (shared/sync-tables.ts `runs`, `crossings`).
 *
 * A heat starts with one run per lane in one transaction. Every tap on a lane button during the
 * race is a crossing written at once, row and outbox entry in one small transaction (one look-up
 * of its run, two inserts, the commit), so a reload or a crash mid-race loses no crossing. Undo of
 * a crossing that never left the device removes it and its outbox entry: it never reaches the
 * server. After a sync, a delete is a hidden row plus a delete op, like a note's.
 *
 * A run and its crossings belong to the coach who timed it; the head coach may change any (the
 * server checks the same through the run: `changeBy` and `parentField`).
 */
import { v7 as uuidv7 } from 'uuid';
import { mayChangeNote } from '../../shared/authors';
import type { Role } from '../../shared/schemas';
import {
  atMsSchema,
  crossingPatchSchema,
  heatStartSchema,
  runPatchSchema,
  targetIdFor,
  type Crossing,
  type CrossingPatch,
  type HeatStart,
  type Run,
  type RunCrossing,
  type RunPatch,
  type RunWithCrossings,
} from '../../shared/schemas/clock';
import { tableSpec } from '../../shared/sync-tables';
import type { SqlValue } from '../driver';
import { decodeRow, insertRecord, selectColumns } from '../fields';
import { queueEdit } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';
import { localDay } from './sessions';

export interface StartHeatInput extends HeatStart {
  teamId: string;
  userId: string;
  /** The signed-in coach's display name, shown as the author at once (the server writes its own). */
  authorName?: string;
}

export interface CrossingInput {
  runId: string;
  userId: string;
  atMs: number;
  handTimed?: boolean;
  /** Made by the caller to paint before the write commits (a UUID v7 otherwise). */
  id?: string;
  role?: Role;
}

const RUN_SELECT = `SELECT id, team_id, ${selectColumns('runs')} FROM runs`;
const CROSSING_SELECT = `SELECT id, team_id, ${selectColumns('crossings')} FROM crossings`;

const fieldClocks = (fields: Record<string, unknown>, hlc: string) => Object.fromEntries(Object.keys(fields).map((field) => [field, hlc]));

/** A live run, or StoreError. */
async function runRow(ctx: StoreContext, id: string): Promise<Run> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${RUN_SELECT} WHERE id = ? AND deleted = 0`, [id]);
  if (!row) throw new StoreError('That run no longer exists');
  return decodeRow<Run>('runs', row);
}

/** A live crossing, or StoreError. */
async function crossingRow(ctx: StoreContext, id: string): Promise<Crossing> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${CROSSING_SELECT} WHERE id = ? AND deleted = 0`, [id]);
  if (!row) throw new StoreError('That crossing no longer exists');
  return decodeRow<Crossing>('crossings', row);
}

function assertMayChange(run: { createdBy: string }, userId: string, role: Role | undefined) {
  // The coach who timed the run changes it and its crossings; the head coach any; without a role, only the author.
  if (!mayChangeNote(run, userId, role)) throw new StoreError('Only the coach who timed this run or the head coach may change it');
}

/** The run's own check (its distance fits its track), as the server makes it. */
function assertRunFits(run: Record<string, unknown>, id: string, teamId: string) {
  const problem = tableSpec('runs').check?.(run, { id, teamId });
  if (problem) throw new StoreError(problem);
}

/**
 * Starts a heat: one run per lane, every row and its outbox entry in one transaction. A lane
 * whose `targetMs` is left out takes the skater's target for the distance from the device (a
 * snapshot: changing the target later does not change the run); null means none. `startedAt` is
 * read on the device's clock and stored corrected by the server's (see DeviceStore.correctedNow).
 */
export async function startHeat(ctx: StoreContext, input: StartHeatInput): Promise<Run[]> {
  const heat = validate<HeatStart>(heatStartSchema, {
    heatId: input.heatId,
    startedAt: input.startedAt,
    ...(input.day !== undefined ? { day: input.day } : {}),
    runs: input.runs,
  });
  // The start tap was read on the device's own clock: in the server's time, like every instant
  // the store writes (a phone running 10 minutes fast would otherwise start in the future).
  const startedAt = new Date(ctx.fromDeviceClock(Date.parse(heat.startedAt))).toISOString();
  const day = heat.day ?? localDay(Date.parse(startedAt));
  const createdAt = new Date(ctx.now()).toISOString();
  ctx.assertWriter(input.userId);
  return ctx.tx(async () => {
    const made: Run[] = [];
    for (const draft of heat.runs) {
      let targetMs = draft.targetMs;
      if (targetMs === undefined) {
        targetMs = null;
        if (draft.distanceM > 0) {
          const [target] = await ctx.db.all<{ target_ms: number }>(`SELECT target_ms FROM targets WHERE id = ?`, [
            targetIdFor(input.teamId, draft.skaterId, draft.track, draft.distanceM),
          ]);
          targetMs = target?.target_ms ?? null;
        }
      }
      const run: Run = {
        id: draft.id ?? uuidv7(),
        teamId: input.teamId,
        heatId: heat.heatId,
        skaterId: draft.skaterId,
        day,
        distanceM: draft.distanceM,
        track: draft.track,
        lane: draft.lane,
        startedAt,
        startOffsetMs: draft.startOffsetMs ?? 0,
        targetMs,
        status: 'running',
        stopReason: '',
        note: draft.note ?? '',
        createdBy: input.userId,
        authorName: input.authorName ?? '',
        createdAt,
      };
      const { id: _id, teamId: _team, ...fields } = run;
      assertRunFits(fields, run.id, run.teamId);
      const hlc = ctx.tick();
      await insertRecord(ctx.db, 'runs', run, fields, fieldClocks(fields, hlc));
      await ctx.enqueue({ teamId: run.teamId, userId: input.userId, table: 'runs', recordId: run.id, kind: 'upsert', fields, hlc });
      made.push(run);
    }
    return made;
  });
}

/** One tap on a lane button: the crossing and its outbox entry, committed at once. */
export async function recordCrossing(ctx: StoreContext, input: CrossingInput): Promise<Crossing> {
  const atMs = validate<number>(atMsSchema, input.atMs);
  const createdAt = new Date(ctx.now()).toISOString();
  return ctx.tx(async () => {
    const [run] = await ctx.db.all<{ team_id: string; created_by: string }>(`SELECT team_id, created_by FROM runs WHERE id = ? AND deleted = 0`, [
      input.runId,
    ]);
    if (!run) throw new StoreError('That run no longer exists');
    assertMayChange({ createdBy: run.created_by }, input.userId, input.role);
    const crossing: Crossing = {
      id: input.id ?? uuidv7(),
      teamId: run.team_id,
      runId: input.runId,
      atMs,
      handTimed: input.handTimed ?? false,
      createdAt,
    };
    const { id: _id, teamId: _team, ...fields } = crossing;
    const hlc = ctx.tick();
    await insertRecord(ctx.db, 'crossings', crossing, fields, fieldClocks(fields, hlc));
    await ctx.enqueue({ teamId: crossing.teamId, userId: input.userId, table: 'crossings', recordId: crossing.id, kind: 'upsert', fields, hlc });
    return crossing;
  });
}

/**
 * Removes a record of a table that hides deleted rows, inside the caller's transaction: one that
 * never left the device goes with its outbox entries (it never reaches the server); one the
 * server may have seen becomes a hidden row with a delete op.
 */
async function removeRecord(ctx: StoreContext, table: 'runs' | 'crossings', id: string, teamId: string, userId: string) {
  const { db } = ctx;
  const [{ sent, synced }] = await db.all<{ sent: number; synced: number }>(
    `SELECT (SELECT count(*) FROM outbox WHERE tbl = ? AND record_id = ? AND sent_at IS NOT NULL) AS sent,
            (SELECT synced FROM ${table} WHERE id = ?) AS synced`,
    [table, id, id],
  );
  if (sent === 0 && synced === 0) {
    ctx.assertWriter(userId);
    const mine = ctx.mine();
    await db.run(`DELETE FROM outbox WHERE tbl = ? AND record_id = ?${mine.sql}`, [table, id, ...mine.params]);
    await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [table, id]);
    await db.run(`DELETE FROM ${table} WHERE id = ?`, [id]);
  } else {
    await db.run(`UPDATE ${table} SET deleted = 1 WHERE id = ?`, [id]);
    await ctx.enqueue({ teamId, userId, table, recordId: id, kind: 'delete', fields: {}, hlc: ctx.tick() });
  }
}

/** Undo of the last tap, or a mis-tap deleted after the race. */
export async function removeCrossings(ctx: StoreContext, ids: readonly string[], userId: string, role?: Role): Promise<void> {
  await ctx.tx(async () => {
    for (const id of ids) {
      const crossing = await crossingRow(ctx, id);
      assertMayChange(await runRow(ctx, crossing.runId), userId, role);
      await removeRecord(ctx, 'crossings', id, crossing.teamId, userId);
    }
  });
}

/** Moves a crossing's time or marks it hand-timed (after the race). */
export async function updateCrossing(ctx: StoreContext, id: string, userId: string, patch: CrossingPatch, role?: Role): Promise<Crossing> {
  const changes = validate<CrossingPatch>(crossingPatchSchema, patch);
  return ctx.tx(async () => {
    const crossing = await crossingRow(ctx, id);
    assertMayChange(await runRow(ctx, crossing.runId), userId, role);
    const fields: Record<string, unknown> = {};
    for (const field of ['atMs', 'handTimed'] as const) {
      if (changes[field] !== undefined && changes[field] !== crossing[field]) fields[field] = changes[field];
    }
    if (Object.keys(fields).length === 0) return crossing;
    await queueEdit(ctx, {
      teamId: crossing.teamId, userId, table: 'crossings', recordId: id, fields,
      previous: Object.fromEntries(Object.keys(fields).map((f) => [f, crossing[f as keyof CrossingPatch]])),
    });
    return crossingRow(ctx, id);
  });
}

/**
 * Changes a run after it started: finish or stop it, its note, or what was set up wrong. Only the
 * fields that change are queued, except those in `always` (sent as they are: an end of a run sets
 * its status and reason together, so an older reason from another device never sticks to it).
 */
export async function updateRun(
  ctx: StoreContext,
  id: string,
  userId: string,
  patch: RunPatch,
  role?: Role,
  always: readonly (keyof RunPatch)[] = [],
): Promise<Run> {
  const changes = validate<RunPatch>(runPatchSchema, patch);
  return ctx.tx(async () => {
    const run = await runRow(ctx, id);
    assertMayChange(run, userId, role);
    const fields: Record<string, unknown> = {};
    for (const [field, value] of Object.entries(changes) as [keyof RunPatch, unknown][]) {
      if (value !== undefined && (value !== run[field] || always.includes(field))) fields[field] = value;
    }
    if (Object.keys(fields).length === 0) return run;
    const { id: _id, teamId: _team, ...current } = run;
    assertRunFits({ ...current, ...fields }, run.id, run.teamId);
    await queueEdit(ctx, {
      teamId: run.teamId, userId, table: 'runs', recordId: id, fields,
      previous: Object.fromEntries(Object.keys(fields).map((f) => [f, run[f as keyof RunPatch]])),
    });
    return runRow(ctx, id);
  });
}

/** Ends a run: finished at the last split, or stopped (a fall, a disqualification), and kept. */
export function finishRun(
  ctx: StoreContext,
  id: string,
  userId: string,
  end: { status: 'finished' | 'stopped'; stopReason?: string },
  role?: Role,
): Promise<Run> {
  return updateRun(ctx, id, userId, { status: end.status, stopReason: end.status === 'stopped' ? (end.stopReason ?? '') : '' }, role, ['status', 'stopReason']);
}

/** Deletes a run (a false start) with its crossings. */
export async function removeRun(ctx: StoreContext, id: string, userId: string, role?: Role): Promise<void> {
  await ctx.tx(async () => {
    const run = await runRow(ctx, id);
    assertMayChange(run, userId, role);
    const crossings = await ctx.db.all<{ id: string }>(`SELECT id FROM crossings WHERE run_id = ? AND deleted = 0`, [id]);
    for (const c of crossings) await removeRecord(ctx, 'crossings', c.id, run.teamId, userId);
    await removeRecord(ctx, 'runs', id, run.teamId, userId);
  });
}

/** Runs with their live crossings (sorted by atMs), in the order of `rows`. */
export async function withCrossings(ctx: StoreContext, rows: Record<string, SqlValue>[]): Promise<RunWithCrossings[]> {
  if (rows.length === 0) return [];
  const runs = rows.map((row) => decodeRow<Run>('runs', row));
  const crossings = await ctx.db.all<{ id: string; run_id: string; at_ms: number; hand_timed: number }>(
    `SELECT id, run_id, at_ms, hand_timed FROM crossings
      WHERE run_id IN (SELECT value FROM json_each(?)) AND deleted = 0 ORDER BY at_ms, id`,
    [JSON.stringify(runs.map((r) => r.id))],
  );
  const byRun = new Map<string, RunCrossing[]>(runs.map((r) => [r.id, []]));
  for (const c of crossings) byRun.get(c.run_id)?.push({ id: c.id, atMs: c.at_ms, handTimed: c.hand_timed === 1 });
  return runs.map((run) => ({ ...run, crossings: byRun.get(run.id) ?? [] }));
}

/** The team's runs of a rink day, newest first, with their crossings. */
export async function listRunsOnDay(ctx: StoreContext, teamId: string, day: string): Promise<RunWithCrossings[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `${RUN_SELECT} WHERE team_id = ? AND day = ? AND deleted = 0 ORDER BY started_at DESC, id DESC`,
    [teamId, day],
  );
  return withCrossings(ctx, rows);
}

/**
 * Runs still running, to resume after a reload or a crash, newest first, with their crossings:
 * with `createdBy`, only that coach's (another coach's open runs are theirs to finish).
 */
export async function listOpenRuns(ctx: StoreContext, teamId: string, createdBy?: string): Promise<RunWithCrossings[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `${RUN_SELECT} WHERE team_id = ? AND status = 'running' AND deleted = 0${createdBy !== undefined ? ' AND created_by = ?' : ''}
      ORDER BY started_at DESC, id DESC`,
    createdBy !== undefined ? [teamId, createdBy] : [teamId],
  );
  return withCrossings(ctx, rows);
}

/** One live run with its crossings, or null. */
export async function getRun(ctx: StoreContext, id: string): Promise<RunWithCrossings | null> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(`${RUN_SELECT} WHERE id = ? AND deleted = 0`, [id]);
  return (await withCrossings(ctx, rows))[0] ?? null;
}
