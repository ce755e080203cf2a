/**
 * POST /api/sync/push: applies one batch of device ops in ONE transaction (shared/SYNC.md, "Push").
 * The numbered steps below match the sections of SYNC.md and the brief:
 *
 *   Push.1  the team counter is bumped first: its row lock serialises this team's pushes and makes
 *           server_seq commit in order ("Server order").
 *   Push.2  op ids already in op_log (a retry after a lost reply) answer `duplicate` with the stored
 *           result and are not applied again. The counter lock of Push.1 serialises the team's
 *           pushes, so no other transaction can add this team's op ids before COMMIT: one read tells.
 *   Push.3  each new op is checked for role (permission), field values (validation) and, for an
 *           unknown record, whether it carries what a new record needs (unknown_record).
 *   Push.4  merge per field ("Conflicts"): newest HLC wins per field, incoming clocks clamped to
 *           server now + 60 s, and a delete wins over any edit (a tombstone is never resurrected).
 *   Push.5  changed rows are written with unnest() bulk upserts (parameters per column, never per
 *           row, so the 65,535 bind-parameter limit cannot be reached), each with a fresh server_seq.
 *   Push.6  each new op id goes into op_log with its result (one bulk INSERT), then COMMIT.
 *
 * Any database error rolls the whole batch back; the route answers 503 and nothing is applied.
 */
import type { DataSource, QueryRunner } from 'typeorm';
import { describeIssues } from '../../../shared/schemas/errors';
import type { Role } from '../../../shared/schemas';
import type { Op, OpResult, PushBody, PushReply, PushTable } from '../../../shared/schemas/sync';
import { clampHlc, observeHlc, serverClock, serverNow } from './clock';
import { lockCounter, nextSeqs } from './counter';
import { tableSpecs, type RefTable } from './tables';

export interface Caller {
  userId: string;
  role: Role;
  /** The skater a skater account is, or a guardian is linked to. */
  skaterId: string | null;
}

/** A record as the batch sees it: loaded from the database, then changed in memory. */
interface RecordState {
  table: PushTable;
  id: string;
  exists: boolean;
  isNew: boolean;
  values: Record<string, unknown>;
  fieldHlc: Record<string, string>;
  deletedAt: string | null;
  deletedHlc: string | null;
  /** For cues: when it was archived (kept while it stays archived). */
  archivedAt: string | null;
  dirty: boolean;
}

/** Rows per bulk statement. Parameters are per column (arrays), so this only bounds statement size. */
const WRITE_CHUNK = 1000;

const rows = async <T>(runner: QueryRunner, sql: string, params: unknown[]): Promise<T[]> =>
  (await runner.query(sql, params, true)).records as T[];

const iso = (value: Date | string | null): string | null => (value === null ? null : new Date(value).toISOString());

const rejected = (opId: string, reason: NonNullable<OpResult['reason']>, message: string): OpResult => ({
  opId,
  status: 'rejected',
  reason,
  message,
});

export async function applyPush(dataSource: DataSource, caller: Caller, body: PushBody): Promise<PushReply> {
  const { teamId, clientId } = body;
  const now = serverNow();
  const nowIso = new Date(now).toISOString();

  // Every received clock value is clamped first, then folded into the server clock.
  const ops: Op[] = body.ops.map((op) => ({
    ...op,
    hlc: Object.fromEntries(Object.entries(op.hlc).map(([field, value]) => [field, clampHlc(value, now)])),
  }));
  for (const op of ops) for (const value of Object.values(op.hlc)) observeHlc(value);

  const runner = dataSource.createQueryRunner();
  await runner.connect();
  try {
    await runner.startTransaction();

    // Push.1: the counter row first, locked until COMMIT.
    await lockCounter(runner, teamId);

    // Push.2: which op ids are new? (A repeated id inside one batch counts once: the first.)
    // (A single read: the counter lock above keeps every other push of this team out until COMMIT,
    // and Push.6 writes each id together with its result.)
    const uniqueIds = [...new Set(ops.map((op) => op.opId))];
    const stored = new Map<string, OpResult>();
    const old = await rows<{ op_id: string; result: OpResult | null }>(
      runner,
      `SELECT op_id, result FROM op_log WHERE team_id = $1 AND op_id = ANY($2::uuid[])`,
      [teamId, uniqueIds],
    );
    for (const r of old) stored.set(r.op_id, r.result ?? { opId: r.op_id, status: 'applied' });
    const fresh = new Set(uniqueIds.filter((id) => !stored.has(id)));

    // Push.3 + Push.4: load what the new ops touch or point at, then settle each op in order.
    const newOps: Op[] = [];
    const taken = new Set<string>();
    for (const op of ops) {
      if (fresh.has(op.opId) && !taken.has(op.opId)) {
        taken.add(op.opId);
        newOps.push(op);
      }
    }
    const state = await loadState(runner, teamId, newOps);
    const results = new Map<string, OpResult>();
    for (const op of newOps) results.set(op.opId, settle(op, caller, state, nowIso));

    // Push.5: stamp every changed record with a fresh server_seq and write them in bulk.
    const dirty = [...state.records.values()].filter((r) => r.dirty);
    if (dirty.length > 0) {
      let seq = await nextSeqs(runner, teamId, dirty.length);
      const stamped = dirty.map((record) => ({ record, serverSeq: seq++ }));
      await writeCues(runner, teamId, stamped.filter((s) => s.record.table === 'cues'));
      await writeSessions(runner, teamId, stamped.filter((s) => s.record.table === 'sessions'));
      await writeObservations(runner, teamId, stamped.filter((s) => s.record.table === 'observations'));
    }

    // Push.6: every new op id with its result (rejected ones too), so a retry answers the same. A
    // plain INSERT: an id that is somehow there already fails the batch (503) rather than apply twice.
    for (let i = 0; i < newOps.length; i += WRITE_CHUNK) {
      const chunk = newOps.slice(i, i + WRITE_CHUNK);
      await runner.query(
        `INSERT INTO op_log (team_id, op_id, client_id, user_id, result)
         SELECT $1, op_id, $3, $4, result FROM unnest($2::uuid[], $5::jsonb[]) AS r(op_id, result)`,
        [teamId, chunk.map((op) => op.opId), clientId, caller.userId, chunk.map((op) => JSON.stringify(results.get(op.opId)))],
      );
    }
    await runner.commitTransaction();

    const answered = new Set<string>();
    const answers: OpResult[] = ops.map((op) => {
      const own = results.get(op.opId);
      const first = !answered.has(op.opId);
      answered.add(op.opId);
      if (own && first) return own;
      // A retry: answer `duplicate`, keeping the stored reason so a rejected op stays explained.
      const original = own ?? stored.get(op.opId)!;
      return {
        opId: op.opId,
        status: 'duplicate',
        ...(original.reason ? { reason: original.reason } : {}),
        message: original.status === 'rejected' ? `Already received and rejected: ${original.message ?? ''}`.trim() : 'Already received and applied',
      };
    });
    return { results: answers, serverClock: serverClock(), serverTime: new Date(serverNow()).toISOString() };
  } catch (error) {
    if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
    throw error;
  } finally {
    await runner.release();
  }
}

// ---- loading ----------------------------------------------------------------------------------

interface BatchState {
  records: Map<string, RecordState>;
  /** Live skater ids of the team among those the batch points at. */
  skaters: Set<string>;
}

const key = (table: string, id: string) => `${table}:${id}`;
const isUuid = (value: unknown): value is string =>
  typeof value === 'string' && /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);

async function loadState(runner: QueryRunner, teamId: string, ops: Op[]): Promise<BatchState> {
  const ids: Record<PushTable, Set<string>> = { observations: new Set(), sessions: new Set(), cues: new Set() };
  const skaterIds = new Set<string>();
  for (const op of ops) {
    ids[op.table].add(op.recordId);
    for (const [field, target] of Object.entries(tableSpecs[op.table].refs)) {
      const value = op.fields[field];
      const list = Array.isArray(value) ? value : [value];
      for (const ref of list) {
        if (!isUuid(ref)) continue;
        if (target === 'skaters') skaterIds.add(ref);
        else ids[target].add(ref);
      }
    }
  }
  const records = new Map<string, RecordState>();
  const put = (r: Omit<RecordState, 'exists' | 'isNew' | 'dirty'>) =>
    records.set(key(r.table, r.id), { ...r, exists: true, isNew: false, dirty: false });

  if (ids.observations.size > 0) {
    const found = await rows<{
      id: string; session_id: string; skater_id: string; cue_id: string; mark: string; note: string; note_shared: boolean;
      created_at: Date; created_by: string; acknowledged_at: Date | null; field_hlc: Record<string, string>;
      deleted_at: Date | null; deleted_hlc: string | null;
    }>(
      runner,
      `SELECT id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by, acknowledged_at,
              field_hlc, deleted_at, deleted_hlc
         FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])`,
      [teamId, [...ids.observations]],
    );
    for (const r of found) {
      put({
        table: 'observations', id: r.id,
        values: {
          sessionId: r.session_id, skaterId: r.skater_id, cueId: r.cue_id, mark: r.mark, note: r.note, noteShared: r.note_shared,
          createdAt: iso(r.created_at), createdBy: r.created_by, acknowledgedAt: iso(r.acknowledged_at),
        },
        fieldHlc: r.field_hlc, deletedAt: iso(r.deleted_at), deletedHlc: r.deleted_hlc, archivedAt: null,
      });
    }
  }
  if (ids.sessions.size > 0) {
    const found = await rows<{
      id: string; day: string; rink: string; title: string; focus_cue_ids: string[]; created_at: Date; created_by: string;
      field_hlc: Record<string, string>; deleted_at: Date | null; deleted_hlc: string | null;
    }>(
      runner,
      `SELECT id, day, rink, title, focus_cue_ids, created_at, created_by, field_hlc, deleted_at, deleted_hlc
         FROM sessions WHERE team_id = $1 AND id = ANY($2::uuid[])`,
      [teamId, [...ids.sessions]],
    );
    for (const r of found) {
      put({
        table: 'sessions', id: r.id,
        values: { day: r.day, rink: r.rink, title: r.title, focusCueIds: r.focus_cue_ids, createdAt: iso(r.created_at), createdBy: r.created_by },
        fieldHlc: r.field_hlc, deletedAt: iso(r.deleted_at), deletedHlc: r.deleted_hlc, archivedAt: null,
      });
    }
  }
  if (ids.cues.size > 0) {
    const found = await rows<{
      id: string; phase: string; label: string; sort_order: number; archived_at: Date | null;
      field_hlc: Record<string, string>; deleted_at: Date | null;
    }>(
      runner,
      `SELECT id, phase, label, sort_order, archived_at, field_hlc, deleted_at
         FROM cues WHERE team_id = $1 AND id = ANY($2::uuid[])`,
      [teamId, [...ids.cues]],
    );
    for (const r of found) {
      put({
        table: 'cues', id: r.id,
        values: { phase: r.phase, label: r.label, sortOrder: r.sort_order, archived: r.archived_at !== null },
        fieldHlc: r.field_hlc, deletedAt: iso(r.deleted_at), deletedHlc: null, archivedAt: iso(r.archived_at),
      });
    }
  }
  const skaters = new Set<string>();
  if (skaterIds.size > 0) {
    const found = await rows<{ id: string }>(
      runner,
      `SELECT id FROM skaters WHERE team_id = $1 AND id = ANY($2::uuid[]) AND deleted_at IS NULL`,
      [teamId, [...skaterIds]],
    );
    for (const r of found) skaters.add(r.id);
  }
  return { records, skaters };
}

// ---- settling one op (Push.3, Push.4) ---------------------------------------------------------

function recordOf(state: BatchState, table: PushTable, id: string): RecordState {
  let record = state.records.get(key(table, id));
  if (!record) {
    record = {
      table, id, exists: false, isNew: false, values: {}, fieldHlc: {},
      deletedAt: null, deletedHlc: null, archivedAt: null, dirty: false,
    };
    state.records.set(key(table, id), record);
  }
  return record;
}

const isLive = (state: BatchState, table: RefTable, id: string) =>
  table === 'skaters' ? state.skaters.has(id) : Boolean(state.records.get(key(table, id))?.exists && !state.records.get(key(table, id))?.deletedAt);

const isCoach = (role: Role) => role === 'head_coach' || role === 'coach';

function settle(op: Op, caller: Caller, state: BatchState, nowIso: string): OpResult {
  const spec = tableSpecs[op.table];
  const record = recordOf(state, op.table, op.recordId);
  const fieldNames = Object.keys(op.fields);

  // Push.3a: role.
  if (!isCoach(caller.role)) {
    // Skaters and guardians may only acknowledge observations of their own (linked) skater.
    const ownObservation =
      op.table === 'observations' && record.exists && caller.skaterId !== null && record.values.skaterId === caller.skaterId;
    if (op.kind !== 'upsert' || fieldNames.length === 0 || fieldNames.some((f) => f !== 'acknowledgedAt') || !ownObservation) {
      return rejected(op.opId, 'permission', 'A skater or guardian may only acknowledge their own notes');
    }
  } else {
    if (op.table === 'cues' && caller.role !== 'head_coach') {
      return rejected(op.opId, 'permission', 'Only the head coach may change the cue library');
    }
    if (fieldNames.includes('acknowledgedAt')) {
      return rejected(op.opId, 'permission', 'Only the skater (or their guardian) acknowledges a note');
    }
  }

  // Push.3b: field values.
  if (op.kind === 'delete') {
    if (fieldNames.length > 0) return rejected(op.opId, 'validation', 'A delete carries no fields');
    if (!op.hlc.deleted) return rejected(op.opId, 'validation', 'hlc.deleted: a delete needs its clock value');
  }
  const values: Record<string, unknown> = {};
  const problems: { path: PropertyKey[]; message: string }[] = [];
  for (const field of fieldNames) {
    const schema = spec.fields[field];
    if (!schema) {
      problems.push({ path: [field], message: `${field} is not a field of ${op.table}` });
      continue;
    }
    if (!op.hlc[field]) problems.push({ path: [field], message: `${field} has no clock value` });
    const parsed = schema.safeParse(op.fields[field]);
    if (parsed.success) values[field] = parsed.data;
    else problems.push(...parsed.error.issues.map((issue) => ({ ...issue, path: [field, ...issue.path] })));
  }
  if (problems.length > 0) return rejected(op.opId, 'validation', describeIssues(problems).message);

  // Push.3c: references must be live records of the same team (new ones of this batch count).
  const creating = !record.exists;
  for (const [field, target] of Object.entries(spec.refs)) {
    if (!(field in values) || (!creating && spec.immutable.has(field))) continue;
    const list = Array.isArray(values[field]) ? (values[field] as string[]) : [values[field] as string];
    const missing = list.find((id) => !isLive(state, target, id));
    if (missing) return rejected(op.opId, 'validation', `${field}: no such ${target.replace(/s$/, '')} in this team (${missing})`);
  }

  // Push.4: merge.
  if (op.kind === 'delete') {
    if (!record.exists || record.deletedAt) {
      // Nothing (or nothing any more) to delete: the outcome is the same, so it counts as applied.
      return { opId: op.opId, status: 'applied', message: record.exists ? 'Already deleted' : 'Nothing to delete' };
    }
    // Delete wins over any edit, whatever its clock: the record becomes a tombstone.
    record.deletedAt = nowIso;
    record.deletedHlc = op.hlc.deleted;
    record.dirty = true;
    return { opId: op.opId, status: 'applied' };
  }

  if (creating) {
    const missing = spec.required.filter((field) => !(field in values));
    if (missing.length > 0) {
      return rejected(op.opId, 'unknown_record', `This record does not exist on the server, and a new one needs: ${missing.join(', ')}`);
    }
    record.exists = true;
    record.isNew = true;
    record.values = { ...spec.defaults, ...values };
    record.fieldHlc = Object.fromEntries(fieldNames.map((field) => [field, op.hlc[field]]));
    record.dirty = true;
    return { opId: op.opId, status: 'applied' };
  }

  if (record.deletedAt) return { opId: op.opId, status: 'applied', message: 'The record was deleted; the change was dropped' };

  // Newest clock wins, field by field (encoded HLCs compare as strings).
  for (const field of fieldNames) {
    if (spec.immutable.has(field)) continue;
    const incoming = op.hlc[field];
    const current = record.fieldHlc[field];
    if (current !== undefined && incoming <= current) continue;
    record.fieldHlc = { ...record.fieldHlc, [field]: incoming };
    record.values[field] = values[field];
  }
  // Restamped even when an older clock lost every field: the row then comes down again in the
  // sender's next pull, and the device replaces its losing local value with the winner.
  record.dirty = true;
  return { opId: op.opId, status: 'applied' };
}

// ---- writing (Push.5) -------------------------------------------------------------------------

interface Stamped {
  record: RecordState;
  serverSeq: number;
}

async function inChunks(items: Stamped[], write: (chunk: Stamped[]) => Promise<unknown>) {
  for (let i = 0; i < items.length; i += WRITE_CHUNK) await write(items.slice(i, i + WRITE_CHUNK));
}

const col = <T>(chunk: Stamped[], pick: (r: RecordState) => T) => chunk.map((s) => pick(s.record));

/**
 * The bulk upsert of observations (one array per column). Exported so the benchmark's raw
 * baseline runs exactly this statement without the endpoint around it.
 */
export const OBSERVATION_UPSERT = `
  INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by,
                            acknowledged_at, field_hlc, server_seq, deleted_at, deleted_hlc)
  SELECT $1, * FROM unnest($2::uuid[], $3::uuid[], $4::uuid[], $5::uuid[], $6::text[], $7::text[], $8::bool[],
                           $9::timestamptz[], $10::uuid[], $11::timestamptz[], $12::jsonb[], $13::bigint[],
                           $14::timestamptz[], $15::text[])
  ON CONFLICT (team_id, id) DO UPDATE SET
    mark = excluded.mark, note = excluded.note, note_shared = excluded.note_shared,
    acknowledged_at = excluded.acknowledged_at, field_hlc = excluded.field_hlc, server_seq = excluded.server_seq,
    deleted_at = excluded.deleted_at, deleted_hlc = excluded.deleted_hlc`;

function writeObservations(runner: QueryRunner, teamId: string, items: Stamped[]) {
  return inChunks(items, (chunk) =>
    runner.query(
      OBSERVATION_UPSERT,
      [
        teamId,
        col(chunk, (r) => r.id),
        col(chunk, (r) => r.values.sessionId),
        col(chunk, (r) => r.values.skaterId),
        col(chunk, (r) => r.values.cueId),
        col(chunk, (r) => r.values.mark),
        col(chunk, (r) => r.values.note),
        col(chunk, (r) => r.values.noteShared),
        col(chunk, (r) => r.values.createdAt),
        col(chunk, (r) => r.values.createdBy),
        col(chunk, (r) => r.values.acknowledgedAt ?? null),
        col(chunk, (r) => JSON.stringify(r.fieldHlc)),
        chunk.map((s) => s.serverSeq),
        col(chunk, (r) => r.deletedAt),
        col(chunk, (r) => r.deletedHlc),
      ],
    ),
  );
}

function writeSessions(runner: QueryRunner, teamId: string, items: Stamped[]) {
  return inChunks(items, (chunk) =>
    runner.query(
      `INSERT INTO sessions (team_id, id, day, rink, title, focus_cue_ids, created_at, created_by, field_hlc, server_seq,
                             deleted_at, deleted_hlc)
       SELECT $1, * FROM unnest($2::uuid[], $3::text[], $4::text[], $5::text[], $6::jsonb[], $7::timestamptz[], $8::uuid[],
                                $9::jsonb[], $10::bigint[], $11::timestamptz[], $12::text[])
       ON CONFLICT (team_id, id) DO UPDATE SET
         rink = excluded.rink, title = excluded.title, focus_cue_ids = excluded.focus_cue_ids,
         field_hlc = excluded.field_hlc, server_seq = excluded.server_seq,
         deleted_at = excluded.deleted_at, deleted_hlc = excluded.deleted_hlc`,
      [
        teamId,
        col(chunk, (r) => r.id),
        col(chunk, (r) => r.values.day),
        col(chunk, (r) => r.values.rink),
        col(chunk, (r) => r.values.title),
        col(chunk, (r) => JSON.stringify(r.values.focusCueIds ?? [])),
        col(chunk, (r) => r.values.createdAt),
        col(chunk, (r) => r.values.createdBy),
        col(chunk, (r) => JSON.stringify(r.fieldHlc)),
        chunk.map((s) => s.serverSeq),
        col(chunk, (r) => r.deletedAt),
        col(chunk, (r) => r.deletedHlc),
      ],
    ),
  );
}

function writeCues(runner: QueryRunner, teamId: string, items: Stamped[]) {
  const stamp = new Date(serverNow()).toISOString();
  return inChunks(items, (chunk) =>
    runner.query(
      `INSERT INTO cues (team_id, id, phase, label, sort_order, archived_at, field_hlc, server_seq, deleted_at)
       SELECT $1, * FROM unnest($2::uuid[], $3::text[], $4::text[], $5::int[], $6::timestamptz[], $7::jsonb[], $8::bigint[],
                                $9::timestamptz[])
       ON CONFLICT (team_id, id) DO UPDATE SET
         phase = excluded.phase, label = excluded.label, sort_order = excluded.sort_order,
         archived_at = excluded.archived_at, field_hlc = excluded.field_hlc, server_seq = excluded.server_seq,
         deleted_at = excluded.deleted_at, updated_at = now()`,
      [
        teamId,
        col(chunk, (r) => r.id),
        col(chunk, (r) => r.values.phase),
        col(chunk, (r) => r.values.label),
        col(chunk, (r) => r.values.sortOrder),
        // An archived cue keeps the moment it was first archived.
        col(chunk, (r) => (r.values.archived ? (r.archivedAt ?? stamp) : null)),
        col(chunk, (r) => JSON.stringify(r.fieldHlc)),
        chunk.map((s) => s.serverSeq),
        col(chunk, (r) => r.deletedAt),
      ],
    ),
  );
}
