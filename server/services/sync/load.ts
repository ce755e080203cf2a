/**
 * Loads what a push batch touches (Push.3): the records its ops name and the records their
 * reference fields point at, one query per table, built from shared/sync-tables.ts; the deletes
 * remembered for ids the server never had (sync_tombstones); the live ids of pull-only tables
 * that ops point at (skaters); and the parents of the records touched (a crossing's run), whose
 * author decides who may change them.
 */
import type { QueryRunner } from 'typeorm';
import type { Op } from '../../../shared/schemas/sync';
import { fieldsOf, fieldSpec, tableSpec, type SyncTableName } from '../../../shared/sync-tables';
import { emptyRecord, recordKey, type BatchState } from './settle';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const isUuid = (value: unknown): value is string => typeof value === 'string' && UUID.test(value);

const rows = async <T>(runner: QueryRunner, sql: string, params: unknown[]): Promise<T[]> =>
  (await runner.query(sql, params, true)).records as T[];

const iso = (value: Date | string | null): string | null => (value === null ? null : new Date(value).toISOString());

/** The SELECT that loads a pushable table's records by id (columns in declaration order). */
export function loadSql(table: SyncTableName): string {
  const columns = fieldsOf(table)
    .filter(([, f]) => f.rule)
    .map(([, f]) => f.column);
  const former = tableSpec(table).formerOwnersColumn;
  return `SELECT id, ${columns.join(', ')}, ${former ? `${former} AS former_owners, ` : ''}field_hlc, deleted_at, deleted_hlc
            FROM ${tableSpec(table).serverTable} WHERE team_id = $1 AND id = ANY($2::uuid[])`;
}

/**
 * Loads records of a pushable table into the batch state (tombstones included): by id, or, with
 * `by`, the live records whose `by` column holds one of the ids (the notes of a session whose
 * delete is asked: `keptWhileReferenced`). A record the batch already holds is left as it is.
 */
async function loadRecords(
  runner: QueryRunner,
  teamId: string,
  table: SyncTableName,
  wanted: Set<string>,
  state: BatchState,
  by?: string,
): Promise<void> {
  const sql = by ? loadSql(table).replace('AND id = ANY($2::uuid[])', `AND ${by} = ANY($2::uuid[]) AND deleted_at IS NULL`) : loadSql(table);
  const found = await rows<Record<string, unknown> & { id: string }>(runner, sql, [teamId, [...wanted]]);
  for (const r of found) {
    const values: Record<string, unknown> = {};
    for (const [name, f] of fieldsOf(table)) {
      if (!f.rule) continue;
      const raw = r[f.column];
      values[name] = f.server === 'timestamptz' ? iso(raw as Date | null) : raw;
    }
    if (by && state.records.has(recordKey(table, r.id))) continue;
    state.records.set(recordKey(table, r.id), {
      ...emptyRecord(table, r.id),
      exists: true,
      values,
      fieldHlc: r.field_hlc as Record<string, string>,
      deletedAt: iso(r.deleted_at as Date | null),
      deletedHlc: r.deleted_hlc as string | null,
      ...(tableSpec(table).formerOwnersColumn ? { formerOwners: (r.former_owners as string[] | null) ?? [] } : {}),
    });
  }
}

export async function loadBatchState(runner: QueryRunner, teamId: string, ops: readonly Op[]): Promise<BatchState> {
  const ids = new Map<SyncTableName, Set<string>>();
  const want = (table: SyncTableName, id: string) => {
    if (!ids.has(table)) ids.set(table, new Set());
    ids.get(table)!.add(id);
  };
  for (const op of ops) {
    want(op.table, op.recordId);
    for (const field of Object.keys(op.fields)) {
      const target = fieldSpec(op.table, field)?.ref;
      if (!target) continue;
      const value = op.fields[field];
      for (const ref of Array.isArray(value) ? value : [value]) if (isUuid(ref)) want(target, ref);
    }
  }

  const state: BatchState = { records: new Map(), live: new Map() };
  for (const [table, wanted] of ids) {
    const spec = tableSpec(table);
    if (spec.pushBy === 'none') {
      const found = await rows<{ id: string }>(
        runner,
        `SELECT id FROM ${spec.serverTable} WHERE team_id = $1 AND id = ANY($2::uuid[]) AND deleted_at IS NULL`,
        [teamId, [...wanted]],
      );
      state.live.set(table, new Set(found.map((r) => r.id)));
      continue;
    }
    await loadRecords(runner, teamId, table, wanted, state);
  }

  // Parents decide who may change a record (a crossing's run): load those no op named.
  const parents = new Map<SyncTableName, Set<string>>();
  for (const record of state.records.values()) {
    const parentField = tableSpec(record.table).parentField;
    const parentTable = parentField ? fieldSpec(record.table, parentField)?.ref : undefined;
    const parentId = parentField ? record.values[parentField] : undefined;
    if (!parentTable || !isUuid(parentId) || state.records.has(recordKey(parentTable, parentId))) continue;
    if (!parents.has(parentTable)) parents.set(parentTable, new Set());
    parents.get(parentTable)!.add(parentId);
  }
  for (const [table, wanted] of parents) await loadRecords(runner, teamId, table, wanted, state);

  // A delete of a record others still point at is refused (a session holding notes): load those.
  const kept = new Map<SyncTableName, { field: string; ids: Set<string> }>();
  for (const op of ops) {
    const rule = op.kind === 'delete' ? tableSpec(op.table).keptWhileReferenced : undefined;
    if (!rule || !isUuid(op.recordId)) continue;
    if (!kept.has(rule.table)) kept.set(rule.table, { field: rule.field, ids: new Set() });
    kept.get(rule.table)!.ids.add(op.recordId);
  }
  for (const [table, { field, ids: wanted }] of kept) await loadRecords(runner, teamId, table, wanted, state, fieldSpec(table, field)!.column);

  // Deletes that arrived before the server ever had the record.
  const missing: string[] = [];
  for (const op of ops) if (!state.records.has(recordKey(op.table, op.recordId))) missing.push(op.recordId);
  if (missing.length > 0) {
    const ghosts = await rows<{ tbl: SyncTableName; id: string; deleted_at: Date; deleted_hlc: string }>(
      runner,
      `SELECT tbl, id, deleted_at, deleted_hlc FROM sync_tombstones WHERE team_id = $1 AND id = ANY($2::uuid[])`,
      [teamId, [...new Set(missing)]],
    );
    for (const g of ghosts) {
      state.records.set(recordKey(g.tbl, g.id), {
        ...emptyRecord(g.tbl, g.id),
        ghost: true,
        deletedAt: iso(g.deleted_at),
        deletedHlc: g.deleted_hlc,
      });
    }
  }
  return state;
}
