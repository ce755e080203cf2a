/**
 * The shadow of server values hidden by local edits.
 *
 * A field with an edit still in the outbox keeps its local value (shared/SYNC.md). The value the
 * server last had for it is kept here (captured when the edit is made, replaced when a pull brings
 * a newer one), so that discarding a rejected edit can put the server's value back, and an
 * acknowledged edit can become the new base for the edits still queued behind it.
 *
 * All functions run inside the caller's device transaction.
 */
import type { PullTable } from '../shared/schemas/sync';
import type { SqlDriver } from './driver';
import { writeFields } from './fields';

type Fields = Record<string, unknown>;

export async function readShadow(db: SqlDriver, table: PullTable, recordId: string): Promise<Fields> {
  const [row] = await db.all<{ fields: string }>(`SELECT fields FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [table, recordId]);
  return row ? (JSON.parse(row.fields) as Fields) : {};
}

export async function writeShadow(db: SqlDriver, table: PullTable, recordId: string, fields: Fields): Promise<void> {
  if (Object.keys(fields).length === 0) {
    await db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [table, recordId]);
    return;
  }
  await db.run(
    `INSERT INTO sync_shadow (tbl, record_id, fields) VALUES (?, ?, ?)
     ON CONFLICT (tbl, record_id) DO UPDATE SET fields = excluded.fields`,
    [table, recordId, JSON.stringify(fields)],
  );
}

/** Before a local edit: remembers the value it replaces, unless an earlier edit already did. */
export async function captureShadow(db: SqlDriver, table: PullTable, recordId: string, previous: Fields): Promise<void> {
  const shadow = await readShadow(db, table, recordId);
  let changed = false;
  for (const [field, value] of Object.entries(previous)) {
    if (Object.prototype.hasOwnProperty.call(shadow, field)) continue;
    shadow[field] = value;
    changed = true;
  }
  if (changed) await writeShadow(db, table, recordId, shadow);
}

/**
 * Outbox edits (any status) still waiting for a record: field -> the newest one setting it. With
 * `userId`, only that user's edits count (on a shared device other people's edits are parked and
 * do not hide anything from the user signed in now).
 */
export async function queuedFieldOwners(
  db: SqlDriver,
  table: PullTable,
  recordId: string,
  userId?: string,
): Promise<Map<string, { seq: number; value: unknown }>> {
  const rows = await db.all<{ seq: number; fields: string }>(
    `SELECT seq, fields FROM outbox WHERE tbl = ? AND record_id = ? AND kind = 'upsert'${userId === undefined ? '' : ' AND user_id = ?'} ORDER BY seq`,
    userId === undefined ? [table, recordId] : [table, recordId, userId],
  );
  const owners = new Map<string, { seq: number; value: unknown }>();
  for (const row of rows) {
    for (const [field, value] of Object.entries(JSON.parse(row.fields) as Fields)) owners.set(field, { seq: row.seq, value });
  }
  return owners;
}

/**
 * After an acknowledged edit left the outbox: fields no later edit touches need no shadow any
 * more; for fields a later edit still hides, the acknowledged value is now the server's.
 */
export async function releaseAcknowledged(db: SqlDriver, table: PullTable, recordId: string, fields: Fields, userId?: string): Promise<void> {
  const shadow = await readShadow(db, table, recordId);
  if (Object.keys(shadow).length === 0) return;
  const owners = await queuedFieldOwners(db, table, recordId, userId);
  for (const [field, value] of Object.entries(fields)) {
    if (owners.has(field)) shadow[field] = value;
    else delete shadow[field];
  }
  await writeShadow(db, table, recordId, shadow);
}

/**
 * After a rejected edit was discarded (and left the outbox): each field it set goes back to the
 * newest remaining edit's value, or, with none left, to the server's value from the shadow.
 */
export async function releaseDiscarded(
  db: SqlDriver,
  table: PullTable,
  recordId: string,
  discarded: { seq: number; fields: Fields },
  userId?: string,
): Promise<void> {
  const shadow = await readShadow(db, table, recordId);
  const owners = await queuedFieldOwners(db, table, recordId, userId);
  const restore: Fields = {};
  for (const field of Object.keys(discarded.fields)) {
    const owner = owners.get(field);
    if (owner) {
      if (owner.seq < discarded.seq) restore[field] = owner.value;
    } else if (Object.prototype.hasOwnProperty.call(shadow, field)) {
      restore[field] = shadow[field];
      delete shadow[field];
    }
  }
  await writeFields(db, table, recordId, restore);
  await writeShadow(db, table, recordId, shadow);
}
