/**
 * Applies one pulled page to the device, all of it or none of it: changes, tombstones, evictions
 * and the new cursor are written in ONE device transaction (shared/SYNC.md, "On the device"). A
 * run cut anywhere therefore resumes from the last page that was fully applied.
 *
 * - Changes are written with multi-row `INSERT … ON CONFLICT (id) DO UPDATE` (up to 1000 rows per
 *   statement, fewer when a row has many columns, well under SQLite's 32,766 bind parameters).
 *   Pulled rows are `synced = 1`.
 * - A field with a local edit still in the outbox keeps its local value, also when the record is
 *   new to the device (after a hand-over the user's own edits arrive before their record); the
 *   server's value is kept in the shadow (sync/shadow.ts) until the edit is acknowledged or
 *   discarded. A record with a waiting delete stays hidden. Only the signed-in user's outbox
 *   counts: changes other people left parked on a shared device never show through.
 * - A tombstone deletes the row and every outbox entry for it (delete wins) - a queued edit must
 *   not bring the record back.
 * - An eviction (the caller may no longer see the record) deletes the row; the caller's own queued
 *   changes stay in the outbox for the server to judge, and show up as rejected if refused, but
 *   for those only the record's skater makes (an acknowledgement of a note moved to another
 *   skater): they go with the row.
 * - The last page of a full re-sync also sweeps the rows the re-sync did not confirm.
 */
import type { Change, PullReply, PullTable } from '../shared/schemas/sync';
import type { SqlDriver, SqlValue } from './driver';
import { encodeFields, isPullTable, PULL_TABLES } from './fields';
import { fieldSpec } from '../shared/sync-tables';
import { readShadow, writeShadow } from './shadow';
import type { DeviceStore, SyncKeys } from './store';
import { hidesDeleted } from './outbox';
import type { OwnerFilter } from './store-context';

export const APPLY_ROWS_PER_STATEMENT = 1000;
/** SQLite's default SQLITE_MAX_VARIABLE_NUMBER (3.32+). */
export const SQLITE_MAX_PARAMS = 32_766;

export interface ApplySummary {
  changes: number;
  tombstones: number;
  evictions: number;
  cursor: number;
}

/** The user's waiting changes on one record: the newest local value per field, and a delete. */
type Local = { values: Map<string, unknown>; deleting: boolean };

type Row = { id: string; names: string[]; columns: string[]; values: SqlValue[]; masked: Local | null; fields: Record<string, unknown> };

const json = (values: readonly unknown[]) => JSON.stringify(values);

async function setMeta(db: SqlDriver, key: string, value: string) {
  await db.run(`INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [key, value]);
}

/** The signed-in user's waiting changes, per `table/id`, for the page's records. */
async function maskedFields(db: SqlDriver, changes: readonly Change[], mine: OwnerFilter): Promise<Map<string, Local>> {
  const masks = new Map<string, Local>();
  if (changes.length === 0) return masks;
  const rows = await db.all<{ tbl: string; record_id: string; kind: 'upsert' | 'delete'; fields: string }>(
    `SELECT tbl, record_id, kind, fields FROM outbox WHERE record_id IN (SELECT value FROM json_each(?))${mine.sql} ORDER BY seq`,
    [json(changes.map((c) => c.id)), ...mine.params],
  );
  for (const r of rows) {
    const key = `${r.tbl}/${r.record_id}`;
    if (!masks.has(key)) masks.set(key, { values: new Map(), deleting: false });
    const local = masks.get(key)!;
    if (r.kind === 'delete') local.deleting = true;
    else for (const [field, value] of Object.entries(JSON.parse(r.fields) as Record<string, unknown>)) local.values.set(field, value);
  }
  return masks;
}

/** Multi-row upsert of rows sharing one column list. */
async function upsertRows(db: SqlDriver, table: PullTable, teamId: string, columns: string[], rows: Row[]) {
  const perRow = columns.length + 2;
  const chunk = Math.max(1, Math.min(APPLY_ROWS_PER_STATEMENT, Math.floor(SQLITE_MAX_PARAMS / perRow)));
  const placeholders = `(${['?', '?', ...columns.map(() => '?')].join(', ')}, 1)`;
  const updates = [...columns.map((c) => `${c} = excluded.${c}`), 'synced = 1'].join(', ');
  for (let start = 0; start < rows.length; start += chunk) {
    const part = rows.slice(start, start + chunk);
    const params: SqlValue[] = [];
    for (const row of part) params.push(row.id, teamId, ...row.values);
    await db.run(
      `INSERT INTO ${table} (id, team_id, ${columns.map((c) => `${c}, `).join('')}synced) VALUES ${part.map(() => placeholders).join(', ')}
       ON CONFLICT (id) DO UPDATE SET ${updates}`,
      params,
    );
  }
}

/**
 * A row with local changes waiting. New to the device: inserted with the local values of the
 * fields the user changed (and hidden if they deleted it). Already held: only the fields without
 * a local change are updated. Either way the server's values of the hidden fields go to the shadow.
 */
async function upsertMaskedRow(db: SqlDriver, table: PullTable, teamId: string, row: Row) {
  const local = row.masked!;
  const inserted = encodeFields(table, { ...row.fields, ...Object.fromEntries(local.values) });
  const extra = local.deleting && hidesDeleted(table) ? ['deleted'] : [];
  const updates = [...row.columns.filter((_, i) => !local.values.has(row.names[i])).map((c) => `${c} = excluded.${c}`), 'synced = 1'];
  await db.run(
    `INSERT INTO ${table} (id, team_id, ${[...inserted.columns, ...extra].map((c) => `${c}, `).join('')}synced)
     VALUES (${['?', '?', ...inserted.columns.map(() => '?'), ...extra.map(() => '1')].join(', ')}, 1)
     ON CONFLICT (id) DO UPDATE SET ${updates.join(', ')}`,
    [row.id, teamId, ...inserted.values],
  );
  const hidden = Object.fromEntries(Object.entries(row.fields).filter(([field]) => local.values.has(field)));
  if (Object.keys(hidden).length > 0) {
    await writeShadow(db, table, row.id, { ...(await readShadow(db, table, row.id)), ...hidden });
  }
}

/**
 * A record evicted from this device (a note moved to another skater) takes along the signed-in
 * user's own changes to it that only the record's skater could make (an acknowledgement, waiting
 * or already refused): they were about a note that is no longer theirs, and would otherwise stay
 * as a refused change the skater cannot fix. Any other change stays for the server to judge.
 */
async function dropMootOwnChanges(db: SqlDriver, evictions: readonly { table: PullTable; id: string }[], mine: OwnerFilter) {
  if (evictions.length === 0) return;
  const rows = await db.all<{ seq: number; tbl: string; fields: string }>(
    `SELECT seq, tbl, fields FROM outbox WHERE record_id IN (SELECT value FROM json_each(?))${mine.sql}`,
    [json(evictions.map((e) => e.id)), ...mine.params],
  );
  const evicted = new Set(evictions.map((e) => e.table as string));
  const moot = rows.filter((r) => {
    if (!evicted.has(r.tbl) || !isPullTable(r.tbl)) return false;
    const names = Object.keys(JSON.parse(r.fields) as Record<string, unknown>);
    return names.length > 0 && names.every((name) => fieldSpec(r.tbl as PullTable, name)?.writer === 'own_skater');
  });
  if (moot.length > 0) await db.run(`DELETE FROM outbox WHERE seq IN (SELECT value FROM json_each(?))`, [json(moot.map((r) => r.seq))]);
}

/** Deletes rows; a tombstone (`dropOutbox`) also drops the signed-in user's queued changes on them. */
async function deleteRecords(db: SqlDriver, items: readonly { table: PullTable; id: string }[], dropOutbox: OwnerFilter | null) {
  const byTable = new Map<PullTable, string[]>();
  for (const item of items) {
    if (!isPullTable(item.table)) continue;
    if (!byTable.has(item.table)) byTable.set(item.table, []);
    byTable.get(item.table)!.push(item.id);
  }
  for (const [table, ids] of byTable) {
    await db.run(`DELETE FROM ${table} WHERE id IN (SELECT value FROM json_each(?))`, [json(ids)]);
    await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id IN (SELECT value FROM json_each(?))`, [table, json(ids)]);
    if (dropOutbox) {
      await db.run(`DELETE FROM outbox WHERE tbl = ? AND record_id IN (SELECT value FROM json_each(?))${dropOutbox.sql}`, [
        table,
        json(ids),
        ...dropOutbox.params,
      ]);
    }
  }
}

/** Marks the team's confirmed rows as "to be confirmed again" and restarts from cursor 0. */
export async function beginFullResync(store: DeviceStore, teamId: string, run?: { userId: string | undefined }): Promise<void> {
  const sync = run ? store.syncInternals(run.userId) : store.syncInternals();
  const keys = sync.keys(teamId);
  await sync.transaction(async () => {
    for (const table of PULL_TABLES) await sync.db.run(`UPDATE ${table} SET synced = 2 WHERE team_id = ? AND synced = 1`, [teamId]);
    await setMeta(sync.db, keys.cursor, '0');
    await setMeta(sync.db, keys.resync, '1');
  });
}

/**
 * The end of a full re-sync: rows it did not bring back are gone on the server (their tombstones
 * expired), unless the unsent outbox still refers to them.
 */
async function sweepUnconfirmed(db: SqlDriver, teamId: string, keys: SyncKeys, mine: OwnerFilter) {
  const keep: Partial<Record<PullTable, string>> = {
    sessions: `OR id IN (SELECT session_id FROM observations WHERE id IN (SELECT record_id FROM outbox WHERE tbl = 'observations'${mine.sql}))`,
    // A run whose crossings still wait to be sent stays with them.
    runs: `OR id IN (SELECT run_id FROM crossings WHERE id IN (SELECT record_id FROM outbox WHERE tbl = 'crossings'${mine.sql}))`,
  };
  for (const table of PULL_TABLES) {
    await db.run(
      `DELETE FROM ${table} WHERE team_id = ? AND synced = 2
         AND NOT (id IN (SELECT record_id FROM outbox WHERE tbl = ?${mine.sql}) ${keep[table] ?? ''})`,
      [teamId, table, ...mine.params, ...(keep[table] ? mine.params : [])],
    );
    await db.run(`UPDATE ${table} SET synced = 1 WHERE team_id = ? AND synced = 2`, [teamId]);
    await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id NOT IN (SELECT id FROM ${table})`, [table]);
  }
  await db.run(`DELETE FROM meta WHERE key = ?`, [keys.resync]);
}

/**
 * `run.userId`: the user the page was pulled for (left out: the user the store is open for). If
 * someone else opened the store since, nothing is applied (OwnerChanged).
 */
export async function applyPullPage(store: DeviceStore, teamId: string, page: PullReply, run?: { userId: string | undefined }): Promise<ApplySummary> {
  const sync = run ? store.syncInternals(run.userId) : store.syncInternals();
  const { db, mine } = sync;
  const keys = sync.keys(teamId);
  return sync.transaction(async () => {
    // The newest change per record wins within the page.
    const latest = new Map<string, Change>();
    for (const change of page.changes) {
      const key = `${change.table}/${change.id}`;
      const seen = latest.get(key);
      if (!seen || seen.serverSeq <= change.serverSeq) latest.set(key, change);
    }
    const changes = [...latest.values()];
    const masks = await maskedFields(db, changes, mine);

    // Rows sharing a table and column list go into the same multi-row statement.
    const groups = new Map<string, { table: PullTable; columns: string[]; rows: Row[] }>();
    const maskedRows: { table: PullTable; row: Row }[] = [];
    for (const change of changes) {
      const { names, columns, values } = encodeFields(change.table, change.fields);
      const row: Row = { id: change.id, names, columns, values, masked: masks.get(`${change.table}/${change.id}`) ?? null, fields: change.fields };
      if (row.masked) {
        maskedRows.push({ table: change.table, row });
        continue;
      }
      const key = `${change.table}:${columns.join(',')}`;
      if (!groups.has(key)) groups.set(key, { table: change.table, columns, rows: [] });
      groups.get(key)!.rows.push(row);
    }
    for (const group of groups.values()) await upsertRows(db, group.table, teamId, group.columns, group.rows);
    for (const { table, row } of maskedRows) await upsertMaskedRow(db, table, teamId, row);

    await deleteRecords(db, page.tombstones, mine);
    await deleteRecords(db, page.evictions, null);
    await dropMootOwnChanges(db, page.evictions, mine);

    await setMeta(db, keys.cursor, String(page.nextCursor));
    if (!page.hasMore) {
      const [resync] = await db.all<{ value: string }>(`SELECT value FROM meta WHERE key = ?`, [keys.resync]);
      if (resync) await sweepUnconfirmed(db, teamId, keys, mine);
    }
    sync.receiveClock(page.serverClock);
    return { changes: page.changes.length, tombstones: page.tombstones.length, evictions: page.evictions.length, cursor: page.nextCursor };
  });
}
