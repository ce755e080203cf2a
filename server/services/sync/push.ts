/**
 * POST /api/sync/push: applies one batch of device ops in ONE transaction (shared/SYNC.md, "Push").
 * The numbered steps match SYNC.md; the decisions are in settle.ts (pure), the reads in load.ts
 * and the writes in write.ts:
 *
 *   Push.1  the team counter is bumped first: its row lock serialises this team's pushes and makes
 *           server_seq commit in order ("Server order").
 *   Push.2  op ids already in op_log: the caller's own answer `duplicate` with the stored result
 *           (a retry after a lost reply) and are not applied again; another user's are a
 *           `conflict` (an op id proves nothing about who sent it first).
 *   Push.3  clock values are checked per op before they touch any clock (clock.ts), then clamped
 *           (order kept); each op is checked for role, values, author and instants (settle.ts).
 *   Push.4  merge per field, delete wins, deletes of unknown ids leave a tombstone (settle.ts).
 *   Push.5  changed records are written in bulk with fresh server_seq numbers (write.ts); a
 *           record PostgreSQL refuses rejects the ops that changed it, and the rest is written.
 *   Push.6  each applied op id goes into op_log with its result (one bulk INSERT), then COMMIT.
 *           Rejected ops are not logged: a rejection changes nothing, so answering a retry
 *           afresh is safe, and refused input cannot grow the log.
 *
 * Any other database error rolls the whole batch back; the route answers 503 and nothing is
 * applied.
 */
import type { DataSource, QueryRunner } from 'typeorm';
import type { Op, OpResult, PushBody, PushReply } from '../../../shared/schemas/sync';
import { clampBatch, clockProblem, MAX_CLOCK_LEAD_MS, observeHlc, serverClock, serverNow } from './clock';
import { lockCounter, nextSeqs } from './counter';
import { loadBatchState } from './load';
import { settleBatch, type Caller } from './settle';
import { WRITE_CHUNK, writeRecords, type Stamped } from './write';

export type { Caller } from './settle';

const rows = async <T>(runner: QueryRunner, sql: string, params: unknown[]): Promise<T[]> =>
  (await runner.query(sql, params, true)).records as T[];

/** When each team was created (it never changes): the earliest instant its records may carry. */
const teamCreatedAt = new Map<string, number>();

async function createdAtOf(runner: QueryRunner, teamId: string): Promise<number> {
  let at = teamCreatedAt.get(teamId);
  if (at === undefined) {
    const [team] = await rows<{ created_at: Date }>(runner, `SELECT created_at FROM teams WHERE id = $1`, [teamId]);
    at = team ? new Date(team.created_at).getTime() : 0;
    teamCreatedAt.set(teamId, at);
  }
  return at;
}

/** Checks every clock value of each op; refused ops by id, with the reason. */
function refuseBadClocks(ops: readonly Op[]): Map<string, string> {
  const refused = new Map<string, string>();
  for (const op of ops) {
    for (const [field, value] of Object.entries(op.hlc)) {
      const problem = clockProblem(value);
      if (problem) {
        refused.set(op.opId, `hlc.${field}: ${problem}`);
        break;
      }
    }
  }
  return refused;
}

export async function applyPush(dataSource: DataSource, caller: Caller, body: PushBody): Promise<PushReply> {
  const { teamId, clientId } = body;
  const now = serverNow();

  const runner = dataSource.createQueryRunner();
  await runner.connect();
  try {
    await runner.startTransaction();

    // Push.1: the counter row first, locked until COMMIT.
    await lockCounter(runner, teamId);

    // Push.2: which op ids are new, which are this user's retries, which are someone else's?
    const uniqueIds = [...new Set(body.ops.map((op) => op.opId))];
    const logged = await rows<{ op_id: string; user_id: string; result: OpResult | null }>(
      runner,
      `SELECT op_id, user_id, result FROM op_log WHERE team_id = $1 AND op_id = ANY($2::uuid[])`,
      [teamId, uniqueIds],
    );
    const stored = new Map<string, OpResult>();
    const foreign = new Set<string>();
    for (const r of logged) {
      if (r.user_id === caller.userId) stored.set(r.op_id, r.result ?? { opId: r.op_id, status: 'applied' });
      else foreign.add(r.op_id);
    }
    const newOps: Op[] = [];
    const taken = new Set<string>();
    for (const op of body.ops) {
      if (stored.has(op.opId) || foreign.has(op.opId) || taken.has(op.opId)) continue;
      taken.add(op.opId);
      newOps.push(op);
    }

    // Push.3: clock values checked per op, then clamped in order.
    const refused = refuseBadClocks(newOps);
    const clamped = clampBatch(
      teamId,
      newOps.filter((op) => !refused.has(op.opId)).flatMap((op) => Object.values(op.hlc)),
      now,
    );
    const ops = newOps.map((op) =>
      refused.has(op.opId) ? op : { ...op, hlc: Object.fromEntries(Object.entries(op.hlc).map(([f, v]) => [f, clamped.get(v) ?? v])) },
    );

    // Push.3 + Push.4: load what the ops touch or point at, then settle each op in order.
    const state = await loadBatchState(runner, teamId, ops.filter((op) => !refused.has(op.opId)));
    const { results, touched } = settleBatch(
      ops,
      state,
      { caller, teamId, now, teamCreatedAt: await createdAtOf(runner, teamId), maxLeadMs: MAX_CLOCK_LEAD_MS },
      refused,
    );

    // Push.5: stamp every changed record with a fresh server_seq and write them in bulk.
    const dirty = [...state.records.values()].filter((r) => r.dirty);
    if (dirty.length > 0) {
      let seq = await nextSeqs(runner, teamId, dirty.length);
      const stamped: Stamped[] = dirty.map((record) => ({ record, serverSeq: seq++ }));
      const refusedRecords = await writeRecords(runner, teamId, stamped);
      for (const [opId, key] of touched) {
        const message = refusedRecords.get(key);
        if (message) results.set(opId, { opId, status: 'rejected', reason: 'validation', message });
      }
    }

    // Only applied ops move the team's clock: a refused value never touches it.
    const appliedOps = ops.filter((op) => results.get(op.opId)?.status === 'applied');
    for (const op of appliedOps) for (const value of Object.values(op.hlc)) observeHlc(teamId, value);

    // Push.6: every applied op id with its result, so a retry answers `duplicate`. A plain
    // INSERT: an id that is somehow there already fails the batch (503) rather than apply twice.
    for (let i = 0; i < appliedOps.length; i += WRITE_CHUNK) {
      const chunk = appliedOps.slice(i, i + WRITE_CHUNK);
      await runner.query(
        `INSERT INTO op_log (team_id, op_id, client_id, user_id, result)
         SELECT $1, op_id, $3, $4, result FROM unnest($2::uuid[], $5::jsonb[]) AS r(op_id, result)`,
        [teamId, chunk.map((op) => op.opId), clientId, caller.userId, chunk.map((op) => JSON.stringify(results.get(op.opId)))],
      );
    }
    await runner.commitTransaction();

    const answered = new Set<string>();
    const answers: OpResult[] = body.ops.map((op) => {
      if (foreign.has(op.opId)) {
        return { opId: op.opId, status: 'rejected', reason: 'conflict', message: 'This change id was already used by another account: it was not applied' };
      }
      const own = results.get(op.opId);
      const first = !answered.has(op.opId);
      answered.add(op.opId);
      if (own && first) return own;
      // A retry: answer `duplicate`, keeping a stored reason so a rejected op stays explained.
      const original = own ?? stored.get(op.opId)!;
      return {
        opId: op.opId,
        status: 'duplicate',
        ...(original.reason ? { reason: original.reason } : {}),
        message: original.status === 'rejected' ? `Already received and rejected: ${original.message ?? ''}`.trim() : 'Already received and applied',
      };
    });
    return { results: answers, serverClock: serverClock(teamId), serverTime: new Date(serverNow()).toISOString() };
  } catch (error) {
    if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
    throw error;
  } finally {
    await runner.release();
  }
}
