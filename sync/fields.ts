/**
 * How the protocol's camelCase record fields (pull changes, outbox ops, the shadow of hidden
 * server values) map onto the device tables' columns, derived from the one description of each
 * synced table (shared/sync-tables.ts: the device table has the protocol name, each field its
 * column and device type). Unknown fields are ignored, so a newer server can add fields without
 * breaking older apps. The device store reads and writes its rows through the same mapping, so a
 * table's columns are listed nowhere else on the device.
 */
import type { PullTable } from '../shared/schemas/sync';
import { fieldsOf, isSyncTableName, syncTableNames, type DeviceType } from '../shared/sync-tables';
import type { SqlDriver, SqlValue } from './driver';

type Encode = (value: unknown) => SqlValue;

const encoders: Record<DeviceType, Encode> = {
  text: (v) => (v === null || v === undefined ? null : typeof v === 'string' ? v : String(v)),
  int: (v) => (v === null || v === undefined ? null : Math.trunc(Number(v))),
  bool: (v) => (v ? 1 : 0),
  // A missing list is an empty one; null stays null (a target without section shares).
  json: (v) => (v === undefined ? '[]' : v === null ? null : JSON.stringify(v)),
};

export interface Column {
  field: string;
  column: string;
  encode: Encode;
}

export const TABLE_COLUMNS: Record<PullTable, readonly Column[]> = Object.fromEntries(
  syncTableNames.map((table) => [table, fieldsOf(table).map(([field, f]) => ({ field, column: f.column, encode: encoders[f.device] }))]),
) as unknown as Record<PullTable, readonly Column[]>;

export const PULL_TABLES: readonly PullTable[] = syncTableNames;

export const isPullTable = (value: string): value is PullTable => isSyncTableName(value);

/** The known columns present in `fields`, in the table's column order, with encoded values. */
export function encodeFields(
  table: PullTable,
  fields: Record<string, unknown>,
): { names: string[]; columns: string[]; values: SqlValue[] } {
  const names: string[] = [];
  const columns: string[] = [];
  const values: SqlValue[] = [];
  for (const c of TABLE_COLUMNS[table]) {
    if (!Object.prototype.hasOwnProperty.call(fields, c.field)) continue;
    names.push(c.field);
    columns.push(c.column);
    values.push(c.encode(fields[c.field]));
  }
  return { names, columns, values };
}

type Decode = (value: SqlValue) => unknown;

const decoders: Record<DeviceType, Decode> = {
  text: (v) => v,
  int: (v) => (v === null ? null : Number(v)),
  bool: (v) => v === 1,
  json: (v) => (v === null ? null : JSON.parse(String(v))),
};

const TABLE_DECODERS = Object.fromEntries(
  syncTableNames.map((table) => [table, fieldsOf(table).map(([field, f]) => ({ field, column: f.column, decode: decoders[f.device] }))]),
) as unknown as Record<PullTable, readonly { field: string; column: string; decode: Decode }[]>;

/** Every column of the table's fields, for a SELECT list (the description's order). */
export const selectColumns = (table: PullTable): string => TABLE_COLUMNS[table].map((c) => c.column).join(', ');

/**
 * A device row back in protocol form: the fields whose columns the row has (with `id`, and
 * `teamId` when the row carries `team_id`). Screens get the same shapes that sync sends.
 */
export function decodeRow<T>(table: PullTable, row: Record<string, SqlValue>): T {
  const record: Record<string, unknown> = { id: row.id };
  if (row.team_id !== undefined) record.teamId = row.team_id;
  for (const c of TABLE_DECODERS[table]) {
    if (row[c.column] !== undefined) record[c.field] = c.decode(row[c.column]);
  }
  return record as T;
}

/** Writes field values (protocol form) into a record's columns. */
export async function writeFields(db: SqlDriver, table: PullTable, recordId: string, fields: Record<string, unknown>): Promise<void> {
  const { columns, values } = encodeFields(table, fields);
  if (columns.length === 0) return;
  await db.run(`UPDATE ${table} SET ${columns.map((c) => `${c} = ?`).join(', ')} WHERE id = ?`, [...values, recordId]);
}

/**
 * Inserts a record made on this device (not synced yet) from its protocol fields; `hlc`, when
 * given, goes in with it (the tap's insert carries its clock values: no second statement).
 */
export function insertRecord(
  db: SqlDriver,
  table: PullTable,
  record: { id: string; teamId: string },
  fields: Record<string, unknown>,
  hlc?: Record<string, string>,
): Promise<unknown> {
  const { columns, values } = encodeFields(table, fields);
  if (hlc) {
    columns.push('hlc');
    values.push(JSON.stringify(hlc));
  }
  // Not async: the tap awaits the insert itself, with nothing in between.
  return db.run(`INSERT INTO ${table} (id, team_id, ${columns.join(', ')}) VALUES (?, ?, ${columns.map(() => '?').join(', ')})`, [
    record.id,
    record.teamId,
    ...values,
  ]);
}
