/**
 * How the protocol's camelCase record fields (pull changes, outbox ops, the shadow of hidden
 * server values) map onto the device tables' columns, derived from the one description of each
 * synced table (shared/sync-tables.ts: the device table has the protocol name, each field its
 * column and device type). Unknown fields are ignored, so a newer server can add fields without
 * breaking older apps.
 */
import type { PullTable } from '../shared/schemas/sync';
import { fieldsOf, isSyncTableName, syncTableNames, type DeviceType } from '../shared/sync-tables';
import type { SqlValue } from './driver';

type Encode = (value: unknown) => SqlValue;

const encoders: Record<DeviceType, Encode> = {
  text: (v) => (v === null || v === undefined ? null : typeof v === 'string' ? v : String(v)),
  int: (v) => (v === null || v === undefined ? null : Math.trunc(Number(v))),
  bool: (v) => (v ? 1 : 0),
  json: (v) => JSON.stringify(v ?? []),
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
