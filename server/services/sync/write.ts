/**
 * Writes what a push settled (Push.5): one unnest() upsert per table and chunk, built from
 * shared/sync-tables.ts (parameters per column, never per row, so the 65,535 bind-parameter limit
 * cannot be reached), each row with its fresh server_seq; deletes of ids the server never had go
 * to sync_tombstones.
 *
 * A value PostgreSQL refuses (SQLSTATE class 22 "data exception" or 23 "integrity constraint")
 * must not fail the batch: the chunk is rolled back to its savepoint and written again row by row,
 * each under its own savepoint, and the rows it still refuses are answered to push.ts, which
 * rejects the ops that changed them (a cue label its phase has already is said in plain words).
 * Any other error (the database gone, a serialization failure) is thrown and the whole batch
 * rolls back.
 */
import type { QueryRunner } from 'typeorm';
import { duplicateCueMessage, type Phase } from '../../../shared/cues';
import { fieldsOf, pushableTables, tableSpec, type SyncTableName } from '../../../shared/sync-tables';
import { recordKey, type RecordState } from './settle';

/** Rows per bulk statement. Parameters are per column (arrays), so this only bounds statement size. */
export const WRITE_CHUNK = 1000;

export interface Stamped {
  record: RecordState;
  serverSeq: number;
}

const writable = (table: SyncTableName) => fieldsOf(table).filter(([, f]) => f.rule);

/** The bulk upsert of one table: $1 the team, then one array per column. */
export function upsertSql(table: SyncTableName): string {
  const fields = writable(table);
  // The skaters a record belonged to before (server only: it decides evictions on pull).
  const former = tableSpec(table).formerOwnersColumn;
  const columns = ['id', ...fields.map(([, f]) => f.column), 'field_hlc', 'server_seq', 'deleted_at', 'deleted_hlc', ...(former ? [former] : [])];
  const types = ['uuid', ...fields.map(([, f]) => f.server), 'jsonb', 'bigint', 'timestamptz', 'text', ...(former ? ['jsonb'] : [])];
  const updates = [
    ...fields.filter(([, f]) => !f.immutable).map(([, f]) => f.column),
    ...(former ? [former] : []),
    'field_hlc',
    'server_seq',
    'deleted_at',
    'deleted_hlc',
  ].map((c) => `${c} = excluded.${c}`);
  return `INSERT INTO ${tableSpec(table).serverTable} (team_id, ${columns.join(', ')})
          SELECT $1, * FROM unnest(${types.map((t, i) => `$${i + 2}::${t}[]`).join(', ')})
          ON CONFLICT (team_id, id) DO UPDATE SET ${updates.join(', ')}`;
}

/** The parameters of upsertSql for a chunk of rows. */
export function upsertParams(table: SyncTableName, teamId: string, chunk: readonly Stamped[]): unknown[] {
  const fields = writable(table);
  const column = (pick: (s: Stamped) => unknown) => chunk.map(pick);
  return [
    teamId,
    column((s) => s.record.id),
    ...fields.map(([name, f]) =>
      column((s) => {
        const value = s.record.values[name] ?? null;
        return f.server === 'jsonb' && value !== null ? JSON.stringify(value) : value;
      }),
    ),
    column((s) => JSON.stringify(s.record.fieldHlc)),
    column((s) => s.serverSeq),
    column((s) => s.record.deletedAt),
    column((s) => s.record.deletedHlc),
    ...(tableSpec(table).formerOwnersColumn ? [column((s) => JSON.stringify(s.record.formerOwners ?? []))] : []),
  ];
}

/** A value the database refused (data exception or integrity constraint), not an outage. */
export function isDataError(error: unknown): error is Error {
  const code = (error as { driverError?: { code?: unknown }; code?: unknown })?.driverError?.code ?? (error as { code?: unknown })?.code;
  return typeof code === 'string' && (code.startsWith('22') || code.startsWith('23'));
}

/**
 * The coach's sentence for a refused record. A cue label its phase has already (the unique index
 * ux_cues_team_phase_label: archived cues count) names the cue it clashes with; any other refusal
 * says what PostgreSQL said.
 */
async function refusalMessage(runner: QueryRunner, teamId: string, item: Stamped, error: Error): Promise<string> {
  const constraint = (error as { driverError?: { constraint?: unknown }; constraint?: unknown }).driverError?.constraint ?? (error as { constraint?: unknown }).constraint;
  if (item.record.table === 'cues' && constraint === 'ux_cues_team_phase_label') {
    const { phase, label } = item.record.values as { phase: Phase; label: string };
    // Same key as the index: NFC, lower-cased by ICU's root locale.
    const key = (sql: string) => `lower(normalize(${sql}, NFC) COLLATE "und-x-icu")`;
    const [taken]: { label: string; archived: boolean }[] = await runner.query(
      `SELECT label, archived FROM cues
        WHERE team_id = $1 AND phase = $2 AND id <> $3 AND deleted_at IS NULL AND ${key('label')} = ${key('$4::text')}
        LIMIT 1`,
      [teamId, phase, item.record.id, label],
    );
    return duplicateCueMessage({ label: taken?.label ?? label, phase, archived: taken?.archived ?? false });
  }
  return `The server's database refused a value: ${error.message}`;
}

const sqlStatementCache = new Map<SyncTableName, string>();
const cachedUpsertSql = (table: SyncTableName) => {
  let sql = sqlStatementCache.get(table);
  if (!sql) {
    sql = upsertSql(table);
    sqlStatementCache.set(table, sql);
  }
  return sql;
};

/** Runs `work` under a savepoint; a data error rolls back to it and is returned, not thrown. */
async function guarded(runner: QueryRunner, name: string, work: () => Promise<unknown>): Promise<Error | null> {
  await runner.query(`SAVEPOINT ${name}`);
  try {
    await work();
    await runner.query(`RELEASE SAVEPOINT ${name}`);
    return null;
  } catch (error) {
    if (!isDataError(error)) throw error;
    await runner.query(`ROLLBACK TO SAVEPOINT ${name}`);
    return error;
  }
}

/**
 * Writes the stamped records of every table and the ghost tombstones. Resolves to the records the
 * database refused, by `table:id`, with the sentence the coach sees (refusalMessage).
 */
export async function writeRecords(runner: QueryRunner, teamId: string, stamped: readonly Stamped[]): Promise<Map<string, string>> {
  const refused = new Map<string, string>();
  const byTable = new Map<SyncTableName, Stamped[]>();
  const ghosts: RecordState[] = [];
  for (const item of stamped) {
    if (item.record.ghost) {
      ghosts.push(item.record);
      continue;
    }
    if (!byTable.has(item.record.table)) byTable.set(item.record.table, []);
    byTable.get(item.record.table)!.push(item);
  }
  // Referenced tables first (the description's order: a crossing's run is written before it,
  // so its foreign key finds the run even when both are new in this batch).
  const order = [...byTable.keys()].sort((a, b) => pushableTables.indexOf(a) - pushableTables.indexOf(b));
  for (const table of order) {
    const items = byTable.get(table)!;
    const sql = cachedUpsertSql(table);
    for (let i = 0; i < items.length; i += WRITE_CHUNK) {
      const chunk = items.slice(i, i + WRITE_CHUNK);
      const failed = await guarded(runner, 'sync_chunk', () => runner.query(sql, upsertParams(table, teamId, chunk)));
      if (!failed) continue;
      // Find the rows the database refuses, one at a time (only after a refusal: rare).
      for (const item of chunk) {
        const error = await guarded(runner, 'sync_row', () => runner.query(sql, upsertParams(table, teamId, [item])));
        if (error) refused.set(recordKey(table, item.record.id), await refusalMessage(runner, teamId, item, error));
      }
    }
  }
  if (ghosts.length > 0) {
    await runner.query(
      `INSERT INTO sync_tombstones (team_id, tbl, id, deleted_hlc)
       SELECT $1, * FROM unnest($2::text[], $3::uuid[], $4::text[]) ON CONFLICT DO NOTHING`,
      [teamId, ghosts.map((g) => g.table), ghosts.map((g) => g.id), ghosts.map((g) => g.deletedHlc)],
    );
  }
  return refused;
}
