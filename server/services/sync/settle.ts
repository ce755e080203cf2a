/**
 * The pure core of a push (shared/SYNC.md, "Push" and "Conflicts"): given the batch's ops and the
 * records they touch as loaded from the database, decide each op and change the records in
 * memory. No I/O: load.ts reads before, write.ts writes after, push.ts holds the transaction.
 *
 *   Push.3  each op is checked for its clock values (done by the caller, passed as `refused`),
 *           role (permission; a record only its author or the head coach may change, an
 *           acknowledgement only the skater may give), field values and instants (validation), its author (the token's
 *           user, never another), and for an unknown record whether it carries what a new record
 *           needs (unknown_record).
 *   Push.4  merge per field: the newest clock value wins (values arrive already clamped), fixed
 *           fields stay as created, and a delete wins over any edit: the record becomes a
 *           tombstone, and a delete of a record the server never knew leaves a tombstone too,
 *           so a create that arrives after it stays deleted.
 *
 * Everything is driven by the table descriptions in shared/sync-tables.ts. Field names from the
 * op are looked up as own properties only: `constructor` or `toString` is an unknown field.
 */
import { describeIssues } from '../../../shared/schemas/errors';
import type { Role } from '../../../shared/schemas';
import type { Op, OpResult } from '../../../shared/schemas/sync';
import { fieldSpec, tableSpec, type SyncTableName } from '../../../shared/sync-tables';

export interface Caller {
  userId: string;
  role: Role;
  /** The skater a skater account is, or a guardian is linked to. */
  skaterId: string | null;
  /** The account's display name, written on the records it creates (`authorName` fields). */
  displayName: string;
}

/** A record as the batch sees it: loaded from the database, then changed in memory. */
export interface RecordState {
  table: SyncTableName;
  id: string;
  /** The server has a row for it (live or a tombstone). */
  exists: boolean;
  values: Record<string, unknown>;
  fieldHlc: Record<string, string>;
  deletedAt: string | null;
  deletedHlc: string | null;
  /** Deleted before the server ever had it: kept in sync_tombstones, not in the table. */
  ghost: boolean;
  /**
   * The skaters the record belonged to before (the table's `formerOwnersColumn`, server only):
   * their pulls get it as an eviction. Empty for tables without one.
   */
  formerOwners?: string[];
  dirty: boolean;
}

export interface BatchState {
  /** Records by `table:id`. */
  records: Map<string, RecordState>;
  /** Live ids of the pull-only tables the batch points at (skaters), by table. */
  live: Map<SyncTableName, Set<string>>;
}

export interface SettleContext {
  caller: Caller;
  /** The team the batch writes into (ids derived from it, such as a target's, are checked). */
  teamId?: string;
  /** The server's time (ms) for this batch. */
  now: number;
  /** When the team was created (ms): no instant of its records is earlier. */
  teamCreatedAt: number;
  /** How far ahead of `now` an instant may be (the clock clamp's lead). */
  maxLeadMs: number;
}

/** Slack for instants just before the team existed (a device clock a few minutes behind). */
export const INSTANT_SLACK_MS = 5 * 60_000;

export const recordKey = (table: string, id: string) => `${table}:${id}`;

const own = (object: object, key: string) => Object.prototype.hasOwnProperty.call(object, key);

const rejected = (opId: string, reason: NonNullable<OpResult['reason']>, message: string): OpResult => ({
  opId,
  status: 'rejected',
  reason,
  message,
});

const applied = (opId: string, message?: string): OpResult => ({ opId, status: 'applied', ...(message ? { message } : {}) });

export const isCoach = (role: Role) => role === 'head_coach' || role === 'coach';

export function emptyRecord(table: SyncTableName, id: string): RecordState {
  return { table, id, exists: false, values: {}, fieldHlc: {}, deletedAt: null, deletedHlc: null, ghost: false, dirty: false };
}

function recordOf(state: BatchState, table: SyncTableName, id: string): RecordState {
  const key = recordKey(table, id);
  let record = state.records.get(key);
  if (!record) {
    record = emptyRecord(table, id);
    state.records.set(key, record);
  }
  return record;
}

const singular = (table: string) => table.replace(/s$/, '');

/** The field holding a table's author (the signed-in user who made the record), if any. */
const authorFieldOf = (table: SyncTableName) => Object.entries(tableSpec(table).fields).find(([, f]) => f.author)?.[0];

/**
 * The record whose author may change this one (shared/sync-tables.ts `changeBy`): the record
 * itself once it exists, or, for a table with a `parentField`, its parent (named by the record,
 * or by the op that creates it), when the batch knows it. Null: nobody's yet (a new record).
 */
function authorityOf(op: Op, record: RecordState, state: BatchState): RecordState | null {
  const parentField = tableSpec(op.table).parentField;
  if (!parentField) return record.exists ? record : null;
  const parentId = record.exists ? record.values[parentField] : own(op.fields, parentField) ? op.fields[parentField] : undefined;
  const parentTable = fieldSpec(op.table, parentField)?.ref;
  if (typeof parentId !== 'string' || !parentTable) return null;
  const parent = state.records.get(recordKey(parentTable, parentId));
  return parent?.exists ? parent : null;
}

/** How many live records of the batch state point at `id` through `rule.field` (as the batch left them so far). */
function referencing(state: BatchState, rule: { table: SyncTableName; field: string }, id: string): number {
  let n = 0;
  for (const record of state.records.values()) {
    if (record.table === rule.table && record.exists && !record.deletedAt && record.values[rule.field] === id) n += 1;
  }
  return n;
}

function isLive(state: BatchState, table: SyncTableName, id: string): boolean {
  if (tableSpec(table).pushBy === 'none') return state.live.get(table)?.has(id) ?? false;
  const record = state.records.get(recordKey(table, id));
  return Boolean(record?.exists && !record.deletedAt);
}

/**
 * Settles every op of a batch in order. `refused` holds ops already refused for their clock
 * values (with the reason). Returns one result per op id (the first op of a repeated id counts);
 * the records in `state` are changed in place and marked `dirty` where they must be written.
 */
export function settleBatch(ops: readonly Op[], state: BatchState, context: SettleContext, refused: ReadonlyMap<string, string> = new Map()) {
  const results = new Map<string, OpResult>();
  /** The records each applied op changed, so a record the database refuses can reject its ops. */
  const touched = new Map<string, string>();
  for (const op of ops) {
    if (results.has(op.opId)) continue;
    const problem = refused.get(op.opId);
    const result = problem ? rejected(op.opId, 'validation', problem) : settleOp(op, state, context);
    results.set(op.opId, result);
    if (result.status === 'applied') touched.set(op.opId, recordKey(op.table, op.recordId));
  }
  return { results, touched };
}

function settleOp(op: Op, state: BatchState, context: SettleContext): OpResult {
  const { caller } = context;
  const spec = tableSpec(op.table);
  const record = recordOf(state, op.table, op.recordId);
  const fieldNames = Object.keys(op.fields);

  // Push.3a: role, per table and per field.
  if (spec.pushBy === 'none') return rejected(op.opId, 'permission', `${op.table} cannot be changed through sync`);
  if (!isCoach(caller.role)) {
    const ownerField = spec.ownerField;
    const mine = Boolean(ownerField && record.exists && !record.deletedAt && caller.skaterId !== null && record.values[ownerField] === caller.skaterId);
    const skaterFieldsOnly = fieldNames.length > 0 && fieldNames.every((f) => fieldSpec(op.table, f)?.writer === 'own_skater');
    if (op.kind !== 'upsert' || !skaterFieldsOnly || !mine) {
      return rejected(op.opId, 'permission', 'A skater or guardian may only acknowledge their own notes');
    }
    // A guardian reads along but never acknowledges on the skater's behalf (PRODUCT.md, "Who uses it").
    if (caller.role !== 'skater') return rejected(op.opId, 'permission', 'Only the skater acknowledges their notes; a guardian reads them');
  } else {
    if (spec.pushBy === 'head_coach' && caller.role !== 'head_coach') {
      return rejected(op.opId, 'permission', `Only the head coach may change ${op.table === 'cues' ? 'the cue library' : op.table}`);
    }
    const skaterField = fieldNames.find((f) => fieldSpec(op.table, f)?.writer === 'own_skater');
    if (skaterField) return rejected(op.opId, 'permission', `Only the skater sets ${skaterField}`);
    // A record that exists belongs to its author and the head coach, where the table says so. A
    // tombstone counts as existing (a delete of it is harmless, but it must answer the same). A
    // record that is part of another (a crossing of a run) belongs to that one's author, from
    // its creation on.
    if (spec.changeBy === 'author_or_head_coach' && caller.role !== 'head_coach') {
      const authority = authorityOf(op, record, state);
      const authorField = authority ? authorFieldOf(authority.table) : undefined;
      if (authority && authorField && authority.values[authorField] !== caller.userId) {
        const verb = op.kind === 'delete' ? 'delete' : record.exists ? 'change' : 'add';
        return rejected(
          op.opId,
          'permission',
          authority === record
            ? `Only its author or the head coach may ${verb} this ${singular(op.table)}`
            : `Only the coach who timed this ${singular(authority.table)} or the head coach may ${verb} its ${op.table}`,
        );
      }
    }
  }
  if (op.kind === 'delete' && spec.deletes === 'never') {
    return rejected(op.opId, 'validation', `${op.table} are never deleted (change them instead)`);
  }
  if (op.kind === 'delete' && spec.deleteGuard) {
    const refusal = guardDelete(op, record, context);
    if (refusal) return refusal;
  }

  // Push.3b: the op's shape, its values and its clock values.
  const hlcNames = Object.keys(op.hlc);
  if (op.kind === 'delete') {
    if (fieldNames.length > 0) return rejected(op.opId, 'validation', 'A delete carries no fields');
    if (!own(op.hlc, 'deleted')) return rejected(op.opId, 'validation', 'hlc.deleted: a delete needs its clock value');
    if (hlcNames.length > 1) return rejected(op.opId, 'validation', 'A delete carries one clock value, under "deleted"');
  } else {
    const stray = hlcNames.find((name) => !own(op.fields, name));
    if (stray !== undefined) return rejected(op.opId, 'validation', `hlc.${stray}: a clock value for a field the op does not change`);
  }
  const values: Record<string, unknown> = {};
  const problems: { path: PropertyKey[]; message: string }[] = [];
  for (const field of fieldNames) {
    const fieldRule = fieldSpec(op.table, field);
    if (!fieldRule?.rule) {
      problems.push({ path: [field], message: `${field} is not a field of ${op.table} that a device may change` });
      continue;
    }
    if (!own(op.hlc, field)) problems.push({ path: [field], message: `${field} has no clock value` });
    const parsed = fieldRule.rule.safeParse(op.fields[field]);
    if (!parsed.success) {
      problems.push(...parsed.error.issues.map((issue) => ({ ...issue, path: [field, ...issue.path] })));
      continue;
    }
    if (fieldRule.author && parsed.data !== caller.userId) {
      return rejected(op.opId, 'permission', `${field} must be the signed-in user: a change cannot be made in someone else's name`);
    }
    if (fieldRule.instant && typeof parsed.data === 'string') {
      const at = Date.parse(parsed.data);
      if (at > context.now + context.maxLeadMs) problems.push({ path: [field], message: `${field} is in the future` });
      else if (at < context.teamCreatedAt - INSTANT_SLACK_MS) problems.push({ path: [field], message: `${field} is before the team existed` });
    }
    Object.defineProperty(values, field, { value: parsed.data, enumerable: true, writable: true, configurable: true });
  }
  if (problems.length > 0) return rejected(op.opId, 'validation', describeIssues(problems).message);

  // Push.3c: references must be live records of the same team (new ones of this batch count).
  const creating = !record.exists && !record.ghost;
  for (const field of Object.keys(values)) {
    const fieldRule = fieldSpec(op.table, field)!;
    if (!fieldRule.ref || (!creating && fieldRule.immutable)) continue;
    const list = Array.isArray(values[field]) ? (values[field] as string[]) : [values[field] as string];
    const missing = list.find((id) => !isLive(state, fieldRule.ref!, id));
    if (missing) return rejected(op.opId, 'validation', `${field}: no such ${fieldRule.ref.replace(/s$/, '')} in this team (${missing})`);
  }

  // Push.4: merge.
  if (op.kind === 'delete') {
    if (record.deletedAt) return applied(op.opId, 'Already deleted');
    const held = spec.keptWhileReferenced ? referencing(state, spec.keptWhileReferenced, op.recordId) : 0;
    if (held > 0) {
      return rejected(
        op.opId,
        'validation',
        `This ${singular(op.table)} still holds ${held} ${held === 1 ? singular(spec.keptWhileReferenced!.table) : spec.keptWhileReferenced!.table}: move them first (nothing was deleted)`,
      );
    }
    // Delete wins over any edit, whatever its clock: the record becomes a tombstone.
    record.deletedAt = new Date(context.now).toISOString();
    record.deletedHlc = op.hlc.deleted;
    if (!record.exists) record.ghost = true;
    record.dirty = true;
    return applied(op.opId, record.ghost ? 'Nothing to delete; the id stays deleted' : undefined);
  }

  if (record.deletedAt) return applied(op.opId, 'The record was deleted; the change was dropped');

  if (creating) {
    const authorField = authorFieldOf(op.table);
    const missing = Object.entries(spec.fields)
      .filter(([name, f]) => f.required && !own(values, name))
      .map(([name]) => name);
    if (missing.length > 0) {
      return rejected(op.opId, 'unknown_record', `This record does not exist on the server, and a new one needs: ${missing.join(', ')}`);
    }
    const initial: Record<string, unknown> = {};
    for (const [name, f] of Object.entries(spec.fields)) if (f.rule && f.initial !== undefined) initial[name] = f.initial;
    const problem = spec.check?.({ ...initial, ...values }, { id: op.recordId, teamId: context.teamId ?? '' });
    if (problem) return rejected(op.opId, 'validation', problem);
    record.exists = true;
    const nameField = Object.entries(spec.fields).find(([, f]) => f.authorName)?.[0];
    record.values = {
      ...initial,
      ...values,
      ...(authorField ? { [authorField]: caller.userId } : {}),
      // The name as the account has it now, whatever the device sent.
      ...(nameField ? { [nameField]: caller.displayName } : {}),
    };
    record.fieldHlc = Object.fromEntries(Object.keys(values).map((field) => [field, op.hlc[field]]));
    record.dirty = true;
    return applied(op.opId);
  }

  // Checked on the record as this op would leave it (fixed fields keep their values), whatever
  // the clocks decide below: an op that would break the record is refused as a whole.
  if (spec.check) {
    const changing = Object.entries(values).filter(([field]) => !fieldSpec(op.table, field)!.immutable);
    const problem = spec.check({ ...record.values, ...Object.fromEntries(changing) }, { id: op.recordId, teamId: context.teamId ?? '' });
    if (problem) return rejected(op.opId, 'validation', problem);
  }

  // Newest clock wins, field by field (encoded HLCs compare as strings).
  const ownerBefore = spec.ownerField ? record.values[spec.ownerField] : undefined;
  for (const field of Object.keys(values)) {
    if (fieldSpec(op.table, field)!.immutable) continue;
    const incoming = op.hlc[field];
    const current = own(record.fieldHlc, field) ? record.fieldHlc[field] : undefined;
    if (current !== undefined && incoming <= current) continue;
    record.fieldHlc = { ...record.fieldHlc, [field]: incoming };
    record.values = { ...record.values, [field]: values[field] };
  }
  if (spec.ownerField && spec.formerOwnersColumn && record.values[spec.ownerField] !== ownerBefore) moveOwner(op, record, ownerBefore);
  // Restamped even when an older clock lost every field: the row then comes down again in the
  // sender's next pull, and the device replaces its losing local value with the winner.
  record.dirty = true;
  return applied(op.opId);
}

/**
 * A delete the table's `deleteGuard` refuses (a tombstone blocks its id for good): an id the
 * server never held (a repeated delete of a tombstone is still harmless), a record whose id is
 * the one derived from its fields (a day's board session), or, for a plain coach, someone else's.
 */
function guardDelete(op: Op, record: RecordState, context: SettleContext): OpResult | null {
  const guard = tableSpec(op.table).deleteGuard!;
  const name = singular(op.table);
  if (record.deletedAt) return null;
  if (guard.held && !record.exists) {
    return rejected(op.opId, 'validation', `No such ${name} on the server: only a ${name} the server holds can be deleted (nothing was deleted)`);
  }
  const derived = guard.derivedId?.(context.teamId ?? '', record.values);
  if (derived && derived === op.recordId) {
    return rejected(op.opId, 'validation', `This is the board's ${name} of its day (its id is derived from team and day): it is never deleted`);
  }
  const authorField = authorFieldOf(op.table);
  if (guard.by === 'author_or_head_coach' && context.caller.role !== 'head_coach' && authorField && record.values[authorField] !== context.caller.userId) {
    return rejected(op.opId, 'permission', `Only its author or the head coach may delete this ${name}`);
  }
  return null;
}

/**
 * The record now belongs to another skater (a note moved in the evening's tidy-up): the one it
 * belonged to is remembered, so their next pull evicts it (pull.ts), and the fields only the
 * skater writes are cleared (an acknowledgement was the old skater's), with the move's clock so a
 * later acknowledgement by the new skater still wins.
 */
function moveOwner(op: Op, record: RecordState, ownerBefore: unknown): void {
  const spec = tableSpec(op.table);
  if (typeof ownerBefore === 'string' && !(record.formerOwners ?? []).includes(ownerBefore)) {
    record.formerOwners = [...(record.formerOwners ?? []), ownerBefore];
  }
  const moveHlc = op.hlc[spec.ownerField!];
  for (const [field, f] of Object.entries(spec.fields)) {
    if (f.writer !== 'own_skater') continue;
    const current = own(record.fieldHlc, field) ? record.fieldHlc[field] : undefined;
    record.values = { ...record.values, [field]: f.initial ?? null };
    record.fieldHlc = { ...record.fieldHlc, [field]: current !== undefined && current > moveHlc ? current : moveHlc };
  }
}
